// Reading when a noted defect happens from a manifest note's words, and
// whether a report flags it then. The notes below are written for this
// test in the manner of the corpus manifest; times are worked by hand
// (frame / fps).
#include <gtest/gtest.h>

#include "support/noted_defect_time.h"

namespace clipwarden::corpus {
namespace {

TEST(NotedDefectTime, ReadsAFrameRangeAtTheFilesRate) {
  const NotedTime t = noted_time("visible defect : a lamp post appears ~f12-18 then vanishes", 24, 48);
  EXPECT_FALSE(t.whole_clip);
  EXPECT_DOUBLE_EQ(t.start_s, 0.5);   // 12 / 24
  EXPECT_DOUBLE_EQ(t.end_s, 0.75);    // 18 / 24
}

TEST(NotedDefectTime, SpansEveryFrameNamed) {
  const NotedTime t = noted_time("visible defect : the kite shrinks between f10 and F12, wing doubled f6", 8, 16);
  EXPECT_DOUBLE_EQ(t.start_s, 0.75);  // 6 / 8
  EXPECT_DOUBLE_EQ(t.end_s, 1.5);     // 12 / 8
}

TEST(NotedDefectTime, ReadsTheLastFramesOfTheFile) {
  const NotedTime t = noted_time("visible defect : the sail vanishes in the last 2 frames", 4, 8);
  EXPECT_FALSE(t.whole_clip);
  EXPECT_DOUBLE_EQ(t.start_s, 1.5);   // frame 6 of 0-7
  EXPECT_DOUBLE_EQ(t.end_s, 1.75);    // frame 7
}

TEST(NotedDefectTime, ANoteWithoutFramesMeansTheWholeClip) {
  EXPECT_TRUE(noted_time("visible defect : the fence is re-drawn frame-to-frame", 12, 24).whole_clip);
  // Letters before an f followed by digits are part of a word, not a frame.
  EXPECT_TRUE(noted_time("visible defect : shelf5 labels change", 12, 24).whole_clip);
}

Report report_with(Verdict status, std::vector<Segment> segments) {
  Report r;
  r.verdict.status = status;
  r.segments = std::move(segments);
  return r;
}

Segment segment(double start_s, double end_s, Severity severity) {
  Segment s;
  s.metric = "drift";
  s.start_s = start_s;
  s.end_s = end_s;
  s.severity = severity;
  return s;
}

TEST(NotedDefectTime, ASegmentCountsWithinAQuarterSecondOrOneFrame) {
  const NotedTime noted{1.0, 1.5, false};
  // 0.2 s before the stretch: within 0.25 s.
  EXPECT_EQ(flag_timing(report_with(Verdict::review, {segment(0.3, 0.8, Severity::review)}), noted, 24),
            FlagTiming::at_noted_time);
  // 0.3 s before it at 24 fps: too far; at 3 fps one frame (0.33 s) is the slack.
  const Report early = report_with(Verdict::review, {segment(0.2, 0.7, Severity::review)});
  EXPECT_EQ(flag_timing(early, noted, 24), FlagTiming::elsewhere);
  EXPECT_EQ(flag_timing(early, noted, 3), FlagTiming::at_noted_time);
}

TEST(NotedDefectTime, InfoSegmentsAndClipLevelRulesAreToldApart) {
  const NotedTime noted{1.0, 1.5, false};
  EXPECT_EQ(flag_timing(report_with(Verdict::review, {segment(1.0, 1.2, Severity::info)}), noted, 24),
            FlagTiming::clip_level_only);
  EXPECT_EQ(flag_timing(report_with(Verdict::pass, {segment(1.0, 1.2, Severity::info)}), noted, 24),
            FlagTiming::not_flagged);
  // A whole-clip note takes any segment above info.
  EXPECT_EQ(flag_timing(report_with(Verdict::reject, {segment(3.0, 3.2, Severity::reject)}), NotedTime{}, 24),
            FlagTiming::at_noted_time);
}

}  // namespace
}  // namespace clipwarden::corpus
