// The flash metric in the order of a clip's analysis: per-frame counts,
// hazard segments, summary details and the screening caution. Expected
// counts follow the WCAG 2.x definitions (see flash_detector_test.cpp).
#include <gtest/gtest.h>

#include <algorithm>

#include "analyzer/metrics/flash_metric.h"
#include "support/detectors_metrics.h"

using namespace clipwarden;
using namespace clipwarden::testing;

namespace {

const PairFiller kNoFlow = [](const FramePlanes&, const FramePlanes&, FramePair&) {};

std::vector<FramePlanes> alternation(double fps, double seconds, int frames_per_state,
                                     cv::Scalar a, cv::Scalar b) {
  std::vector<FramePlanes> frames;
  for (int i = 0; i < static_cast<int>(fps * seconds); ++i)
    frames.push_back(
        planes_of(i, i / fps, cv::Mat(120, 160, CV_8UC3, (i / frames_per_state) % 2 ? b : a)));
  return frames;
}

}  // namespace

TEST(FlashMetric, FiveHertzBlackWhiteIsOneRejectSegmentWithDetails) {
  auto metric = registered_metric("flash");
  ASSERT_NE(metric, nullptr);
  const auto frames = alternation(30, 3, 3, cv::Scalar::all(0), cv::Scalar::all(255));
  const Report r = run_metric(*metric, frames, kNoFlow);
  const auto& v = r.find_series("flash")->values;
  EXPECT_EQ(v[0], 0);
  EXPECT_EQ(*std::max_element(v.begin(), v.end()), 5);
  ASSERT_EQ(r.segments.size(), 1u);
  const Segment& s = r.segments[0];
  EXPECT_EQ(s.metric, "flash");
  EXPECT_EQ(s.severity, Severity::reject);
  EXPECT_EQ(s.peak, 5);
  EXPECT_EQ(s.end_frame, 89);
  // The first hazard frame closes the first window with 4 flashes (8
  // transitions, the 8th at frame 24); the segment starts where the flashing
  // does: the first transition, black to white at frame 3.
  EXPECT_EQ(s.start_frame, 3);
  const auto& d = r.summary.details.at("flash");
  EXPECT_EQ(d.at("max_flashes_per_s"), 5);
  EXPECT_EQ(d.at("kind"), "general");
  EXPECT_EQ(d.at("hazard"), true);
  EXPECT_NEAR(d.at("where").at("end_s").get<double>() - d.at("where").at("start_s").get<double>(),
              29 / 30.0, 1e-9);
  EXPECT_EQ(d.at("caution"), kFlashCaution);
  EXPECT_NE(std::find(r.notes.begin(), r.notes.end(), kFlashCaution), r.notes.end());
}

// Flashing that begins after a calm second: the segment starts where the
// flashing does, not where
// the one-second window of the first hazard frame opens (about frame 25).
// Worked example: black, then 5 Hz white/black from frame 30 on (3 frames
// per state; first transition at frame 30).
TEST(FlashMetric, SegmentStartsWhereTheFlashingStarts) {
  auto metric = registered_metric("flash");
  auto frames = alternation(30, 3, 3, cv::Scalar::all(0), cv::Scalar::all(255));
  for (int i = 0; i < 30; ++i)
    frames[i] = planes_of(i, i / 30.0, cv::Mat(120, 160, CV_8UC3, cv::Scalar::all(0)));
  for (int i = 30; i < static_cast<int>(frames.size()); ++i)
    frames[i] = planes_of(i, i / 30.0,
                          cv::Mat(120, 160, CV_8UC3, ((i - 30) / 3) % 2 ? cv::Scalar::all(0)
                                                                        : cv::Scalar::all(255)));
  const Report r = run_metric(*metric, frames, kNoFlow);
  ASSERT_EQ(r.segments.size(), 1u);
  EXPECT_GE(r.segments[0].start_frame, 28);
  EXPECT_LE(r.segments[0].start_frame, 32);
}

TEST(FlashMetric, SteadyPictureHasNoFlashAndNoCaution) {
  auto metric = registered_metric("flash");
  const auto frames = alternation(24, 2, 1000, cv::Scalar(40, 90, 160), cv::Scalar::all(0));
  const Report r = run_metric(*metric, frames, kNoFlow);
  for (double x : r.find_series("flash")->values) EXPECT_EQ(x, 0);
  EXPECT_TRUE(r.segments.empty());
  const auto& d = r.summary.details.at("flash");
  EXPECT_EQ(d.at("hazard"), false);
  EXPECT_TRUE(d.at("kind").is_null());
  EXPECT_FALSE(d.contains("where"));
  EXPECT_TRUE(r.notes.empty()) << "the caution is for clips that flash";
}

TEST(FlashMetric, OneFrameClip) {
  auto metric = registered_metric("flash");
  const Report r = run_metric(*metric, alternation(24, 1.0 / 24, 1, cv::Scalar::all(9), {}), kNoFlow);
  ASSERT_EQ(r.find_series("flash")->values.size(), 1u);
  EXPECT_EQ(r.find_series("flash")->values[0], 0);
}

TEST(FlashMetric, TwoSeparateBurstsAreTwoSegments) {
  // 4 Hz bursts (every-frame alternation at 8 fps) of 2 s, 4 s apart.
  std::vector<FramePlanes> frames;
  for (int i = 0; i < 8 * 9; ++i) {
    const double t = i / 8.0;
    const bool burst = (t >= 1 && t < 3) || (t >= 6 && t < 8);
    const int v = burst && i % 2 ? 255 : 0;
    frames.push_back(planes_of(i, t, cv::Mat(90, 120, CV_8UC3, cv::Scalar::all(v))));
  }
  auto metric = registered_metric("flash");
  const Report r = run_metric(*metric, frames, kNoFlow);
  ASSERT_EQ(r.segments.size(), 2u);
  EXPECT_LT(r.segments[0].end_s, 3.5);
  EXPECT_GT(r.segments[1].start_s, 5.0);
  EXPECT_EQ(r.summary.details.at("flash").at("hazard_segments"), 2);
}
