// Timing facts (analyzer/decode/stream_timing.*) on hand-made timestamp
// sequences: the expected values follow from the definitions stated in
// stream_timing.h (no outside source: this is our own contract).
#include <gtest/gtest.h>

#include "analyzer/decode/stream_timing.h"

using clipwarden::decode::StreamTiming;

TEST(StreamTiming, ConstantRateIsNotVariable) {
  StreamTiming timing(1.0 / 24, 1.0 / 24);
  for (int i = 0; i < 48; ++i) EXPECT_DOUBLE_EQ(timing.add(100 + i, 1), i / 24.0);
  const auto facts = timing.facts();
  EXPECT_FALSE(facts.vfr);
  EXPECT_EQ(facts.dropped_frames, 0);
  EXPECT_EQ(facts.duplicate_timestamps, 0);
  EXPECT_DOUBLE_EQ(facts.video_duration_s, 2.0);
  EXPECT_EQ(timing.frame_count(), 48);
}

TEST(StreamTiming, MillisecondRoundingOf2997IsNotVariable) {
  // 29.97 fps in a 1 ms time base: intervals of 33 and 34 ticks.
  StreamTiming timing(1e-3, 1001.0 / 30000);
  for (int i = 0; i < 300; ++i) timing.add(std::llround(i * 1001.0 / 30.0));
  EXPECT_FALSE(timing.facts().vfr);
}

TEST(StreamTiming, EveryTenthFrameMissingIsDroppedAndVariable) {
  StreamTiming timing(1.0 / 24, 1.0 / 24);
  for (int i = 0; i < 72; ++i)
    if (i % 10 != 9) timing.add(i);
  const auto facts = timing.facts();
  EXPECT_TRUE(facts.vfr);
  EXPECT_EQ(facts.dropped_frames, 7);
}

TEST(StreamTiming, LongGapCountsEveryMissingFrame) {
  StreamTiming timing(0.1, 0.1);
  for (int ts : {0, 1, 2, 6, 7, 8}) timing.add(ts);  // 3, 4, 5 missing
  EXPECT_EQ(timing.facts().dropped_frames, 3);
}

TEST(StreamTiming, RepeatedTimestampsAreCounted) {
  StreamTiming timing(0.1, 0.1);
  for (int ts : {0, 1, 2, 2, 3, 3, 4}) timing.add(ts);
  const auto facts = timing.facts();
  EXPECT_EQ(facts.duplicate_timestamps, 2);
  EXPECT_EQ(facts.dropped_frames, 0);
}

TEST(StreamTiming, MissingTimestampsContinueAtTheNominalRate) {
  StreamTiming timing(0.01, 0.04);
  EXPECT_DOUBLE_EQ(timing.add(std::nullopt), 0.0);
  EXPECT_NEAR(timing.add(std::nullopt), 0.04, 1e-12);  // the stated interval, 4 ticks
  EXPECT_NEAR(timing.add(8), 0.08, 1e-12);
  EXPECT_NEAR(timing.add(14), 0.14, 1e-12);
  EXPECT_NEAR(timing.add(std::nullopt), 0.18, 1e-12);  // median of 4, 4, 6 ticks
}

TEST(StreamTiming, LastFrameDurationEndsTheClip) {
  StreamTiming timing(0.001, 0.1);
  timing.add(0, 100);
  timing.add(100, 250);  // a long last frame (e.g. a GIF's final delay)
  EXPECT_NEAR(timing.facts().video_duration_s, 0.35, 1e-12);
}
