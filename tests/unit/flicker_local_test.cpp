// Local flicker: block changes after motion compensation, and pulses (a
// swing out and back within a short time) found on each block's level.
// Expected values follow from the definitions in block_pulses.h.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>

#include <opencv2/imgproc.hpp>

#include "analyzer/metrics/block_pulses.h"
#include "support/detectors_metrics.h"

using namespace clipwarden;
using namespace clipwarden::testing;

TEST(BlockChanges, MedianPerBlockOverValidPixelsOnly) {
  cv::Mat cur(64, 64, CV_32F, cv::Scalar(0.30)), prev(64, 64, CV_32F, cv::Scalar(0.30));
  cur(cv::Rect(0, 0, 32, 32)) += 0.05;                 // block (0,0) brighter
  cur(cv::Rect(32, 0, 4, 4)) += 0.5;                   // a few outliers in block (0,1)
  cv::Mat valid(64, 64, CV_8U, cv::Scalar(255));
  valid(cv::Rect(0, 32, 32, 20)).setTo(0);             // block (1,0): 37% valid
  const auto c = block_luminance_changes(cur, prev, valid, 2, 2);
  EXPECT_NEAR(c[0], 0.05, 1e-6);
  EXPECT_NEAR(c[1], 0.0, 1e-6);
  EXPECT_TRUE(std::isnan(c[2]));
  EXPECT_NEAR(c[3], 0.0, 1e-6);
}

TEST(BlockChanges, OnlyChangesShapedLikeLightCount) {
  // 60% of a block darkens (a mouth opening, say) and the rest stays: the
  // median moves, but a quarter of the pixels do not follow, so 0.
  cv::Mat cur(32, 32, CV_32F, cv::Scalar(0.30)), prev = cur.clone();
  cur(cv::Rect(0, 0, 32, 19)) -= 0.1;
  EXPECT_EQ(block_luminance_changes(cur, prev, cv::Mat(), 1, 1)[0], 0.0f);
  // The whole block darkening in proportion to its luminance counts.
  cv::Mat textured(32, 32, CV_32F);
  cv::randu(textured, 0.05, 0.6);
  EXPECT_NEAR(block_luminance_changes(textured * 0.8, textured, cv::Mat(), 1, 1)[0], -0.065, 0.02);
}

TEST(BlockChanges, CommonChangeIsRemoved) {
  std::vector<float> c = {0.03f, 0.03f, 0.08f, NAN, 0.03f};
  EXPECT_FLOAT_EQ(remove_common_change(c), 0.03f);
  EXPECT_NEAR(c[2], 0.05f, 1e-7);
  EXPECT_TRUE(std::isnan(c[3]));
}

namespace {
// Feeds one block's changes at fps; returns the pulses found.
std::vector<Pulse> feed(const std::vector<float>& changes, double fps, double max_pulse_s = 0.5) {
  BlockPulseTracker tracker(1, 0.02, max_pulse_s);
  for (size_t i = 0; i < changes.size(); ++i)
    tracker.add(static_cast<int64_t>(i + 1), (i + 1) / fps, std::span(&changes[i], 1));
  return tracker.pulses();
}
}  // namespace

TEST(BlockPulses, OutAndBackIsOnePulse) {
  std::vector<float> c(20, 0.0f);
  c[5] = 0.05f;   // frame 6 brightens
  c[7] = -0.04f;  // frame 8 darkens back most of the way
  const auto p = feed(c, 24);
  ASSERT_EQ(p.size(), 1u);
  EXPECT_EQ(p[0].start_frame, 6);
  EXPECT_EQ(p[0].end_frame, 8);
  EXPECT_NEAR(p[0].amplitude, 0.04, 1e-6);
}

TEST(BlockPulses, StepsSlowWavesAndSmallNoiseAreNotPulses) {
  std::vector<float> step(20, 0.0f);
  step[5] = 0.08f;
  EXPECT_TRUE(feed(step, 24).empty());
  // Out and back over 2 s (0.05 up over 1 s, down over 1 s) at 24 fps.
  std::vector<float> slow;
  for (int i = 0; i < 48; ++i) slow.push_back(i < 24 ? 0.05f / 24 : -0.05f / 24);
  EXPECT_TRUE(feed(slow, 24).empty());
  std::vector<float> noise;
  for (int i = 0; i < 100; ++i) noise.push_back(i % 2 ? 0.008f : -0.008f);
  EXPECT_TRUE(feed(noise, 24).empty());
}

TEST(BlockPulses, SpreadOverFramesCountsLikeOneStep) {
  // The same 0.06 pulse in one frame at 8 fps and over 5 frames at 60 fps.
  std::vector<float> slow_rate(10, 0.0f);
  slow_rate[2] = 0.06f, slow_rate[3] = -0.06f;
  std::vector<float> fast_rate(40, 0.0f);
  for (int i = 0; i < 5; ++i) fast_rate[10 + i] = 0.012f, fast_rate[15 + i] = -0.012f;
  const auto a = feed(slow_rate, 8), b = feed(fast_rate, 60);
  ASSERT_EQ(a.size(), 1u);
  ASSERT_EQ(b.size(), 1u);
  EXPECT_NEAR(a[0].amplitude, 0.06, 1e-6);
  EXPECT_NEAR(b[0].amplitude, 0.06, 1e-5);
}

namespace {
// A static textured picture with `region` brightened by `delta` (sRGB
// codes) on the given frames; pairs are filled as a still camera would give
// them (warp = identity, all pixels consistent).
Report run_static(const cv::Rect& region, int delta, std::vector<int> lit_frames) {
  cv::Mat base(144, 256, CV_8UC3);
  cv::randu(base, 60, 140);
  cv::GaussianBlur(base, base, cv::Size(0, 0), 2);
  std::vector<FramePlanes> frames;
  for (int i = 0; i < 36; ++i) {
    cv::Mat f = base.clone();
    if (std::find(lit_frames.begin(), lit_frames.end(), i) != lit_frames.end())
      f(region) += cv::Scalar::all(delta);
    frames.push_back(planes_of(i, i / 24.0, f));
  }
  auto metric = registered_metric("flicker_local");
  EXPECT_NE(metric, nullptr);
  return run_metric(*metric, frames, [](const FramePlanes& prev, const FramePlanes&, FramePair& p) {
    p.warped_prev_luminance = prev.luminance;
    p.valid = cv::Mat(prev.luminance.size(), CV_8U, cv::Scalar(255));
  });
}
}  // namespace

TEST(FlickerLocalMetric, APulsingRegionIsFoundAtItsFramesAndBlocks) {
  // 256x144 frame, 16x16 grid: blocks of 16x9 px. The region covers block
  // columns 4-6 and rows 4-7 (12 blocks), lit on frames 12 and 13.
  const Report r = run_static(cv::Rect(64, 36, 48, 36), 40, {12, 13});
  const auto& v = r.find_series("flicker_local")->values;
  EXPECT_TRUE(std::isnan(v[0]));
  for (int i = 1; i < 36; ++i) {
    if (i >= 12 && i <= 14)
      EXPECT_GT(v[i], 0.02) << i;
    else
      EXPECT_EQ(v[i], 0) << i;
  }
  const auto& d = r.summary.details.at("flicker_local");
  EXPECT_EQ(d.at("blocks_involved"), 12);
  EXPECT_NEAR(d.at("max_area_pct").get<double>(), 100.0 * 12 / 256, 1e-9);
  for (const auto& b : d.at("blocks")) {
    EXPECT_GE(b.at("col").get<int>(), 4);
    EXPECT_LE(b.at("col").get<int>(), 6);
    EXPECT_GE(b.at("row").get<int>(), 4);
    EXPECT_LE(b.at("row").get<int>(), 7);
  }
}

TEST(FlickerLocalMetric, WholeFramePulseIsGlobalNotLocal) {
  const Report r = run_static(cv::Rect(0, 0, 256, 144), 40, {12, 13});
  const auto& v = r.find_series("flicker_local")->values;
  for (size_t i = 1; i < v.size(); ++i) EXPECT_EQ(v[i], 0) << i;
  EXPECT_EQ(r.summary.details.at("flicker_local").at("pulses"), 0);
}

TEST(FlickerLocalMetric, ARegionThatChangesForGoodIsNotAPulse) {
  std::vector<int> from_12;
  for (int i = 12; i < 36; ++i) from_12.push_back(i);
  const Report r = run_static(cv::Rect(64, 36, 48, 36), 40, from_12);
  for (size_t i = 1; i < r.frame_times_s.size(); ++i)
    EXPECT_EQ(r.find_series("flicker_local")->values[i], 0) << i;
}
