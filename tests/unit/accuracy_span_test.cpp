// The accuracy scoring's expected span in the report's frames when the file
// stores pictures on a cadence (tests/support/accuracy_score.h). The stored
// frames below are those the analysis kept of Open-Sora 1.3's parrot GIF
// (24 fps, one picture in five stored twice: summary.details.cadence of its
// report, source_frames 0-28 of 80), where a jerk injected at stored frame
// 26 was found at analysed frames 22-23 and scored as a miss before the
// mapping.
#include <gtest/gtest.h>

#include "support/accuracy_score.h"

using namespace clipwarden;
using namespace clipwarden::accuracy;
using inject::DefectClass;

namespace {

Report parrot_like() {
  Report r;
  const std::vector<int64_t> sources = {0,  1,  2,  3,  5,  6,  7,  8,  10, 11, 12, 13, 14, 16, 17,
                                        18, 19, 21, 22, 23, 24, 25, 26, 27, 28};
  r.frame_times_s.assign(sources.size(), 0.0);
  r.summary.details["cadence"] = {{"stored_frames", 30}, {"source_frames", sources}};
  return r;
}

}  // namespace

TEST(AccuracySpan, JerkAtAStoredFrameMapsToItsAnalysedFrame) {
  const nlohmann::json truth = {{"frames", {26, 26}}};
  const FrameSpan span = expected_span(DefectClass::jerk, truth, parrot_like());
  // Displaced stored frame 26 and the next (27): analysed frames 22 and 23.
  EXPECT_EQ(span.start, 22);
  EXPECT_EQ(span.end, 23);
}

TEST(AccuracySpan, ARangeStartingOnALeftOutRepeatStartsAtTheNextPicture) {
  const nlohmann::json truth = {{"frames", {4, 9}}};
  const FrameSpan span = expected_span(DefectClass::flicker, truth, parrot_like());
  // Stored 4 and 9 were left out as repeats: analysed 4 (stored 5) to 7 (stored 8).
  EXPECT_EQ(span.start, 4);
  EXPECT_EQ(span.end, 7);
}

TEST(AccuracySpan, WithoutACadenceTheSpanIsTheTruths) {
  Report r;
  r.frame_times_s.assign(40, 0.0);
  const nlohmann::json truth = {{"frames", {26, 26}}};
  const FrameSpan span = expected_span(DefectClass::jerk, truth, r);
  EXPECT_EQ(span.start, 26);
  EXPECT_EQ(span.end, 27);
}
