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

// Pearson's correlation (the textbook definition) is 1 for a copy scaled
// by a positive gain plus an offset, whatever the gain: light that scales a
// region keeps its pattern. A pattern moved by a quarter of a block is
// another pattern; flat blocks have none to judge.
TEST(BlockTextureAgreement, LightKeepsThePatternAnOccluderDoesNot) {
  cv::Mat prev(64, 64, CV_32F);
  cv::randu(prev, 0.1, 0.5);
  cv::GaussianBlur(prev, prev, cv::Size(0, 0), 1.5);
  const cv::Mat lit = prev * 1.3 + 0.01;
  const auto same = block_texture_agreement(lit, prev, cv::Mat(), 2, 2, 0.02f);
  for (float a : same) EXPECT_NEAR(a, 1.0f, 1e-4);
  cv::Mat moved;
  const cv::Mat shift = (cv::Mat_<double>(2, 3) << 1, 0, 8, 0, 1, 0);
  cv::warpAffine(prev, moved, shift, prev.size(), cv::INTER_LINEAR, cv::BORDER_REFLECT);
  for (float a : block_texture_agreement(moved, prev, cv::Mat(), 2, 2, 0.02f)) EXPECT_LT(a, 0.5f);
  const cv::Mat flat(64, 64, CV_32F, cv::Scalar(0.3));
  for (float a : block_texture_agreement(flat * 1.2, flat, cv::Mat(), 2, 2, 0.02f))
    EXPECT_TRUE(std::isnan(a));
}

TEST(BlockOwnMotion, CameraMotionIsNotOwnMotion) {
  // The camera moves everything by (3, -2) px from prev to cur: the
  // backward flow is (-3, 2) everywhere, which the homography explains.
  const cv::Matx33d camera(1, 0, 3, 0, 1, -2, 0, 0, 1);
  cv::Mat flow(64, 64, CV_32FC2, cv::Scalar(-3, 2));
  // A patch in block (1,1) moves by another 2 px to the right.
  flow(cv::Rect(32, 32, 32, 32)).setTo(cv::Scalar(-5, 2));
  const auto own = block_own_motion(flow, camera, cv::Mat(), 2, 2);
  EXPECT_NEAR(own[0], 0, 1e-5);
  EXPECT_NEAR(own[1], 0, 1e-5);
  EXPECT_NEAR(own[3], 2, 1e-5);
  const auto near = blocks_near_movers({0, 0, 0, 0, 0, 0, 0, 0, 2}, 3, 3, 0.75f);
  // Block 8 (bottom right of a 3 x 3 grid) moves: it and its neighbours
  // 4, 5 and 7 are near a mover, the rest not.
  EXPECT_EQ(near, (std::vector<bool>{false, false, false, false, true, true, false, true, true}));
}

TEST(BlockPulses, OnlyPulsesSharedWithANeighbourAreKept) {
  // Grid 4 wide: blocks 5 and 6 are neighbours, block 15 is alone.
  const std::vector<Pulse> pulses = {
      {5, 10, 14, 0.1}, {6, 12, 16, 0.1}, {15, 10, 14, 0.3}, {9, 30, 32, 0.1}};
  const auto kept = pulses_with_neighbours(pulses, 4);
  ASSERT_EQ(kept.size(), 2u);
  EXPECT_EQ(kept[0].block, 5);
  EXPECT_EQ(kept[1].block, 6);
}

TEST(BlockPulses, ARestartForgetsTheSwingBeforeACut) {
  // One block at 24 fps: brightens by 0.05 at frame 6, darkens back at
  // frame 9. Fed straight through, that is a pulse (min swing 0.02); with
  // a restart between them (a cut at frame 8, whose own change is skipped)
  // the swing back has no first swing in its shot, so nothing pulses.
  std::vector<float> c(20, 0.0f);
  c[5] = 0.05f;
  c[8] = -0.05f;
  ASSERT_EQ(feed(c, 24).size(), 1u);
  BlockPulseTracker tracker(1, 0.02, 0.5);
  for (size_t i = 0; i < c.size(); ++i) {
    const int64_t frame = static_cast<int64_t>(i + 1);
    if (frame == 8) {
      tracker.restart();
      continue;
    }
    tracker.add(frame, frame / 24.0, std::span(&c[i], 1));
  }
  EXPECT_TRUE(tracker.pulses().empty());
  // After the restart a whole pulse within the new shot is found again.
  std::vector<float> later = {0.0f, 0.05f, 0.0f, -0.05f};
  for (size_t i = 0; i < later.size(); ++i)
    tracker.add(static_cast<int64_t>(30 + i), (30 + i) / 24.0, std::span(&later[i], 1));
  EXPECT_EQ(tracker.pulses().size(), 1u);
}

TEST(BlockPulses, PlacesPulsingAroundCountsSeparateRegions) {
  // Grid 4 x 4, frame numbers as times (no frame times given), within 2.
  // Blocks 0, 1 and 5 touch (one place); block 3 and block 15 stand alone;
  // block 12's pulse is long after the others.
  const std::vector<Pulse> pulses = {
      {0, 10, 12, 0.1}, {1, 11, 13, 0.1}, {5, 13, 14, 0.1}, {3, 15, 16, 0.1}, {15, 4, 9, 0.1}, {12, 40, 42, 0.1}};
  const std::vector<int> places = places_pulsing_around(pulses, {}, 2, 4, 4);
  // Pulse on block 0 (frames 8-14 reached): blocks 0, 1, 5 (one place), 3
  // (starts at 15: no), 15 (ends at 9: yes) -> 2 places.
  EXPECT_EQ(places[0], 2);
  // Block 3 (13-18): 1 and 5 (touching 0's place through 1: 0 ends at 12,
  // out), so {1, 5} one place, 3 another -> 2.
  EXPECT_EQ(places[3], 2);
  // Block 5 (11-16): 0, 1, 5 one place, 3 another -> 2.
  EXPECT_EQ(places[2], 2);
  // Block 12 alone in its time.
  EXPECT_EQ(places[5], 1);
  // A region of any size is one place: a 3 x 3 square pulsing together.
  std::vector<Pulse> square;
  for (int r = 0; r < 3; ++r)
    for (int col = 0; col < 3; ++col) square.push_back({r * 4 + col, 20, 22, 0.2});
  for (int p : places_pulsing_around(square, {}, 0.5, 4, 4)) EXPECT_EQ(p, 1);
  // With frame times, the window is in seconds: at 10 fps frames 10-12 and
  // 19-20 are more than 0.5 s apart.
  std::vector<double> times(50);
  for (size_t i = 0; i < times.size(); ++i) times[i] = i / 10.0;
  const std::vector<Pulse> apart = {{0, 10, 12, 0.1}, {15, 19, 20, 0.1}};
  EXPECT_EQ(places_pulsing_around(apart, times, 0.5, 4, 4), (std::vector<int>{1, 1}));
  EXPECT_EQ(places_pulsing_around(apart, times, 0.8, 4, 4), (std::vector<int>{2, 2}));
}

// The clip-level level of recurring pulses. The quantile is numpy.percentile's
// default (linear) method: for n values sorted, q = 0.95 sits at index
// 0.95 (n - 1) between its two neighbours.
TEST(RecurringQuantile, OneEventAloneReadsZeroTwoEventsReadTheQuantile) {
  // 201 frames at 20 fps (10 s); the first frame undefined, as the metric's.
  std::vector<double> v(201, 0.0), t(201);
  for (size_t i = 0; i < t.size(); ++i) t[i] = i / 20.0;
  v[0] = NAN;
  // One event of 0.5 s (frames 50-59, 10 frames, 5% of the 200 defined
  // values): the p95 sits at index 0.95 * 199 = 189.05 of the sorted values,
  // 190 zeros and 10 values of 0.2, so 0 * 0.95 + 0.2 * 0.05 = 0.01 (numpy:
  // percentile([0]*190 + [0.2]*10, 95) = 0.01); but no two frames above 0
  // lie more than 1 s apart, so nothing recurs.
  for (int i = 50; i < 60; ++i) v[i] = 0.2;
  EXPECT_EQ(recurring_quantile(v, t, 0.95, 1.0), 0.0);
  // Raise it to 20 frames (10%) in two events 3 s apart: the p95 is 0.2 at
  // index 189.05 (180 zeros) and the events recur, so 0.2.
  for (int i = 110; i < 120; ++i) v[i] = 0.2;
  EXPECT_NEAR(recurring_quantile(v, t, 0.95, 1.0), 0.2, 1e-12);
  // The second event weaker: what recurs is its 0.1.
  for (int i = 110; i < 120; ++i) v[i] = 0.1;
  EXPECT_NEAR(recurring_quantile(v, t, 0.95, 1.0), 0.1, 1e-12);
  // One event that lasts 2 s (frames 50-89) recurs within itself.
  std::fill(v.begin() + 110, v.begin() + 120, 0.0);
  std::fill(v.begin() + 50, v.begin() + 90, 0.3);
  EXPECT_NEAR(recurring_quantile(v, t, 0.95, 1.0), 0.3, 1e-12);
}

TEST(RecurringQuantile, NeverAboveThePlainQuantile) {
  // Two lone frames of 0.9 far apart, the rest 0: they recur but make 1% of
  // the frames, so the p95 (0: index 0.95 * 199 of 198 zeros) caps it.
  std::vector<double> v(200, 0.0), t(200);
  for (size_t i = 0; i < t.size(); ++i) t[i] = i / 20.0;
  v[10] = v[150] = 0.9;
  EXPECT_EQ(recurring_quantile(v, t, 0.95, 1.0), 0.0);
  EXPECT_TRUE(std::isnan(recurring_quantile(std::vector<double>(3, NAN), t, 0.95, 1.0)));
}

// The brightness-change model (Negahdaripour 1998): a gain or an offset of a
// surface is fitted exactly by a + g * w, so nothing is left; a pattern of
// its own laid over the surface is left whole. For d independent of w the
// fit takes out only what chance correlation explains, so the spread left
// is the pattern's own standard deviation: (b - a) / sqrt(12) for a
// uniform pattern on [a, b]. Each quarter of the block is fitted on its own.
TEST(BlockLightFit, GainAndOffsetLeaveNothingAPatternOfItsOwnIsLeft) {
  cv::Mat surface(64, 64, CV_32F);
  cv::randu(surface, 0.1, 0.5);  // mean 0.3
  const double level = cv::mean(surface)[0];
  const LightFit gain = block_light_fit(surface * 1.2, surface, cv::Mat(), 1, 1, 0.02f)[0];
  EXPECT_NEAR(gain.mean_change, 0.2, 1e-4);  // (1.2 w - w) / w
  EXPECT_NEAR(gain.residual_spread, 0.0, 1e-3);
  const LightFit offset = block_light_fit(surface + 0.05, surface, cv::Mat(), 1, 1, 0.02f)[0];
  EXPECT_NEAR(offset.mean_change, 0.05 / level, 1e-4);
  EXPECT_NEAR(offset.residual_spread, 0.0, 1e-3);
  cv::Mat caustic(64, 64, CV_32F);
  cv::randu(caustic, 0.0, 0.2);  // mean 0.1, spread 0.2 / sqrt(12) = 0.0577
  const LightFit pattern = block_light_fit(surface + caustic, surface, cv::Mat(), 1, 1, 0.02f)[0];
  EXPECT_NEAR(pattern.mean_change, 0.1 / level, 0.01);
  EXPECT_NEAR(pattern.residual_spread, 0.2 / std::sqrt(12.0) / level, 0.01);
  // The edge of a lit region along the middle of the block: each quarter
  // lies on one side and is fitted exactly.
  cv::Mat half_lit = surface.clone();
  half_lit(cv::Rect(0, 0, 32, 64)) *= 1.3;
  EXPECT_NEAR(block_light_fit(half_lit, surface, cv::Mat(), 1, 1, 0.02f)[0].residual_spread, 0.0, 1e-3);
  // Fewer than half the pixels valid: unknown.
  cv::Mat valid(64, 64, CV_8U, cv::Scalar(0));
  valid(cv::Rect(0, 0, 64, 20)).setTo(255);
  EXPECT_TRUE(std::isnan(block_light_fit(surface, surface, valid, 1, 1, 0.02f)[0].mean_change));
}
