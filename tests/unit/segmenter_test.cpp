// The segmenter and summary (analyzer/segments, analyzer/summary). The rules
// are our own contract (docs/report.md, segments); the statistics are checked
// against hand-worked values of their textbook definitions.
#include <gtest/gtest.h>

#include <cmath>

#include "analyzer/frame/series_math.h"
#include "analyzer/segments/segmenter.h"
#include "analyzer/summary/summary.h"

using namespace clipwarden;

namespace {
std::vector<double> times(size_t n) {
  std::vector<double> t(n);
  for (size_t i = 0; i < n; ++i) t[i] = i / 10.0;
  return t;
}
}  // namespace

TEST(SeriesMath, QuantileIsLinearInterpolation) {
  // numpy.percentile's default ("linear") method, worked by hand:
  // sorted {1,2,3,4}: position 0.95*3 = 2.85 -> 3 + 0.85*(4-3) = 3.85.
  EXPECT_DOUBLE_EQ(quantile({4, 1, 3, 2}, 0.95), 3.85);
  EXPECT_DOUBLE_EQ(quantile({4, 1, 3, 2}, 0.5), 2.5);
  EXPECT_TRUE(std::isnan(quantile({}, 0.5)));
  // MAD of {1,1,2,2,4,6,9}: median 2, deviations {1,1,0,0,2,4,7} -> median 1.
  EXPECT_DOUBLE_EQ(median_absolute_deviation({1, 1, 2, 2, 4, 6, 9}), 1.0);
}

TEST(SeriesMath, RunningMedianSkipsUndefined) {
  const double nan = std::nan("");
  auto m = running_median(std::vector<double>{nan, 1, 5, 2, 8}, 1);
  EXPECT_TRUE(std::isnan(m[0]));
  EXPECT_DOUBLE_EQ(m[1], 3.0);  // {1,5}
  EXPECT_DOUBLE_EQ(m[2], 2.0);  // {1,5,2}
  EXPECT_DOUBLE_EQ(m[4], 5.0);  // {2,8}
}

TEST(Segmenter, HysteresisMinimumLengthAndGapMerging) {
  SegmentRule rule{.enter = 1.0, .leave = 0.5, .min_frames = 2, .merge_gap_frames = 1,
                   .baseline_k = 0, .review_peak = 1.5, .reject_peak = 3.0};
  //                          0  1    2    3    4  5    6    7  8    9
  std::vector<double> v = {0, 1.2, 0.7, 0.6, 0, 1.1, 3.5, 0, 0, 1.0};
  auto segs = find_segments("m", v, times(v.size()), rule);
  // 1-3 open at 1.2 and stay above leave 0.5; 5-6 joins across the 1-frame gap
  // at 4; frame 9 alone is shorter than min_frames.
  ASSERT_EQ(segs.size(), 1u);
  EXPECT_EQ(segs[0].start_frame, 1);
  EXPECT_EQ(segs[0].end_frame, 6);
  EXPECT_DOUBLE_EQ(segs[0].peak, 3.5);
  EXPECT_EQ(segs[0].peak_frame, 6);
  EXPECT_EQ(segs[0].severity, Severity::reject);
  EXPECT_DOUBLE_EQ(segs[0].start_s, 0.1);
  EXPECT_DOUBLE_EQ(segs[0].end_s, 0.6);
}

TEST(Segmenter, UndefinedValuesCloseASegment) {
  SegmentRule rule{.enter = 1.0, .leave = 0.5};
  std::vector<double> v = {2, 2, std::nan(""), 2};
  auto segs = find_segments("m", v, times(v.size()), rule);
  ASSERT_EQ(segs.size(), 2u);
  EXPECT_EQ(segs[0].end_frame, 1);
  EXPECT_EQ(segs[1].start_frame, 3);
  EXPECT_EQ(segs[1].severity, Severity::info);
}

TEST(Segmenter, BusyClipIsJudgedAgainstItsOwnBaseline) {
  // 19 x 1.9, 20 x 2.1 and one 4.0: median 2.1; deviations 20 x 0, 19 x 0.2,
  // one 1.9 -> MAD 0.1. enter = max(1.0, 2.1 + 3*1.4826*0.1).
  std::vector<double> v;
  for (int i = 0; i < 40; ++i) v.push_back(i % 2 ? 2.1 : 1.9);
  v[20] = 4.0;
  SegmentRule rule{.enter = 1.0, .leave = 0.8, .baseline_k = 3};
  auto levels = segment_levels(v, rule);
  EXPECT_NEAR(levels.enter, 2.1 + 3 * 1.4826 * 0.1, 1e-9);
  EXPECT_NEAR(levels.leave, levels.enter * 0.8, 1e-9);
  auto segs = find_segments("m", v, times(v.size()), rule);
  ASSERT_EQ(segs.size(), 1u);
  EXPECT_EQ(segs[0].start_frame, 20);
  // Without the baseline every frame of the busy clip would be one segment.
  rule.baseline_k = 0;
  auto flat = find_segments("m", v, times(v.size()), rule);
  ASSERT_EQ(flat.size(), 1u);
  EXPECT_EQ(flat[0].end_frame - flat[0].start_frame + 1, 40);
}

TEST(Summary, CoherenceWeighsFramesBySeverity) {
  std::vector<Segment> segs = {{"a", 0, 9, 0, 0, 0, 0, Severity::reject},
                               {"b", 5, 14, 0, 0, 0, 0, Severity::review},
                               {"c", 30, 39, 0, 0, 0, 0, Severity::info}};
  // 100 frames: 10 at 1.0, 5 at 0.5 (10-14), 10 at 0.1 -> mean 0.135.
  EXPECT_NEAR(coherence_score(segs, 100), 86.5, 1e-9);
  EXPECT_DOUBLE_EQ(coherence_score({}, 100), 100.0);
}

TEST(Summary, StatisticsSkipUndefinedFrames) {
  auto s = summarise_series({{"m", {std::nan(""), 1, 2, 3, 4}}});
  ASSERT_EQ(s.size(), 1u);
  EXPECT_DOUBLE_EQ(s[0].mean, 2.5);
  EXPECT_DOUBLE_EQ(s[0].p50, 2.5);
  EXPECT_DOUBLE_EQ(s[0].p95, 3.85);
  EXPECT_DOUBLE_EQ(s[0].max, 4);
}

TEST(Segmenter, BaselineNeverExcusesAClipPastTheRejectLevel) {
  // Every frame around 2.0, reject at 1.5: the baseline (about 2.4) would
  // swallow everything; capped at reject_peak, the whole clip is one reject
  // segment.
  std::vector<double> v;
  for (int i = 0; i < 40; ++i) v.push_back(i % 2 ? 2.1 : 1.9);
  SegmentRule rule{.enter = 1.0, .leave = 0.8, .baseline_k = 3, .review_peak = 1.0, .reject_peak = 1.5};
  EXPECT_DOUBLE_EQ(segment_levels(v, rule).enter, 1.5);
  auto segs = find_segments("m", v, times(v.size()), rule);
  ASSERT_EQ(segs.size(), 1u);
  EXPECT_EQ(segs[0].end_frame - segs[0].start_frame + 1, 40);
  EXPECT_EQ(segs[0].severity, Severity::reject);
}
