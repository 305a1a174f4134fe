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

TEST(StreamTiming, AnIntervalOfOneAndAHalfIsALateFrameNotAMissingOne) {
  // A webcam's timing (a WebM from imageio's test data): 32 ms frames, and
  // every twelfth interval 48 ms. No frame can be missing from 1.5 intervals.
  StreamTiming timing(1e-3, 0.032);
  int64_t t = 0;
  for (int i = 0; i < 96; ++i) {
    timing.add(t);
    t += i % 12 == 11 ? 48 : 32;
  }
  const auto facts = timing.facts();
  EXPECT_TRUE(facts.vfr);
  EXPECT_EQ(facts.dropped_frames, 0);
}

TEST(StreamTiming, IrregularCaptureCountsOnlyIntervalsNearAWholeMultiple) {
  // tree.avi's first intervals in ticks of 1/15 s (opencv-doc): usually 5-7
  // ticks (median 6), a few of 10 and 11. 10/6 = 1.67 is irregular timing;
  // 11/6 = 1.83 lies within a quarter interval of 2, one missing frame.
  StreamTiming timing(1.0 / 15, 0.4);
  int64_t t = 0;
  for (int d : {11, 6, 7, 7, 6, 6, 6, 7, 5, 6, 5, 6, 6, 5, 6, 10, 6, 6, 6, 6, 7, 5, 6}) {
    timing.add(t);
    t += d;
  }
  timing.add(t);
  EXPECT_EQ(timing.facts().dropped_frames, 1);
  EXPECT_EQ(clipwarden::decode::missing_frames(10, 6), 0);
  EXPECT_EQ(clipwarden::decode::missing_frames(11, 6), 1);
  EXPECT_EQ(clipwarden::decode::missing_frames(9, 6), 0);   // 1.5
  EXPECT_EQ(clipwarden::decode::missing_frames(36, 6), 5);  // 6 intervals
  EXPECT_EQ(clipwarden::decode::missing_frames(27, 6), 0);  // 4.5: not whole
  EXPECT_EQ(clipwarden::decode::missing_frames(5, 0), 0);   // no nominal interval
}
