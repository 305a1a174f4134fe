// The pipeline end to end on frames made in memory (no decoder): a smooth
// pan of a texture, with known defects placed at known frames. The checks
// are the definitions in docs/metrics.md: warp error of frame 0 is undefined; a
// motion-compensated brightness pulse is flicker, a pan is not; a repeated
// frame is a freeze; a jump to another texture is a cut.
#include <gtest/gtest.h>

#include <opencv2/imgproc.hpp>

#include "analyzer/pipeline/frame_stream.h"
#include "clipwarden/analysis.h"
#include "clipwarden/report_io.h"
#include "support/synthetic_source.h"

using namespace clipwarden;
using namespace clipwarden::fixtures;

namespace {

const cv::Size kFrame(192, 108);

Policy test_policy() {
  Policy p;
  p.segments["flicker"] = {.enter = 0.02, .leave = 0.01, .review_peak = 0.02, .reject_peak = 0.05};
  p.segments["freeze"] = {.enter = 0.5, .leave = 0.5, .review_peak = 0.5};
  p.segments["cut"] = {.enter = 0.5, .leave = 0.4, .review_peak = 0.5};
  p.segments["warp_error"] = {.enter = 0.02, .leave = 0.01, .review_peak = 0.02};
  return p;
}

Report run(SyntheticSource& source, int threads = 2) {
  AnalysisSettings settings;
  settings.threads = threads;
  auto report = analyze_source(source, "synthetic", settings, test_policy());
  EXPECT_TRUE(report.ok()) << (report.ok() ? "" : report.error().message());
  return report.ok() ? std::move(report.value()) : Report{};
}

std::vector<Segment> segments_of(const Report& r, const std::string& metric) {
  std::vector<Segment> out;
  for (const auto& s : r.segments)
    if (s.metric == metric) out.push_back(s);
  return out;
}

}  // namespace

TEST(Pipeline, SmoothPanIsCoherent) {
  const cv::Mat texture = smooth_texture({400, 200}, 7);
  SyntheticSource source(30, 24,
                         [&](int64_t i) { return view(texture, 1.5 * i, 0.5 * i, kFrame); });
  const Report r = run(source);
  ASSERT_EQ(r.frame_times_s.size(), 30u);
  EXPECT_TRUE(std::isnan(r.find_series("warp_error")->values[0]));
  EXPECT_LT(r.find_summary("warp_error")->p95, 2e-3);
  EXPECT_TRUE(r.segments.empty());
  EXPECT_EQ(r.verdict.status, Verdict::pass);
  EXPECT_DOUBLE_EQ(r.summary.coherence, 100.0);
  EXPECT_TRUE(validate_report_json(report_to_json(r), "pipeline").ok());
}

TEST(Pipeline, BrightnessPulseIsFlickerAtItsFrames) {
  const cv::Mat texture = smooth_texture({400, 200}, 8);
  SyntheticSource source(40, 24, [&](int64_t i) {
    cv::Mat f = view(texture, 1.0 * i, 0, kFrame);
    if (i == 20 || i == 21) f.convertTo(f, -1, 1.0, 30);  // +30 levels for two frames
    return f;
  });
  const Report r = run(source);
  auto flicker = segments_of(r, "flicker");
  ASSERT_EQ(flicker.size(), 1u);
  EXPECT_EQ(flicker[0].start_frame, 20);
  EXPECT_EQ(flicker[0].end_frame, 21);
  EXPECT_TRUE(segments_of(r, "cut").empty());
}

TEST(Pipeline, RepeatedFrameIsAFreeze) {
  const cv::Mat texture = smooth_texture({400, 200}, 9);
  SyntheticSource source(30, 24, [&](int64_t i) {
    const int64_t shown = (i == 13 || i == 14) ? 12 : i;  // frames 13, 14 repeat 12
    return view(texture, 2.0 * shown, 0, kFrame);
  });
  const Report r = run(source);
  const auto& freeze = r.find_series("freeze")->values;
  EXPECT_EQ(freeze[13], 1.0);
  EXPECT_EQ(freeze[14], 1.0);
  EXPECT_EQ(freeze[12], 0.0);
  EXPECT_EQ(freeze[15], 0.0);
  auto segs = segments_of(r, "freeze");
  ASSERT_EQ(segs.size(), 1u);
  EXPECT_EQ(segs[0].start_frame, 13);
  EXPECT_EQ(segs[0].end_frame, 14);
}

TEST(Pipeline, JumpToAnotherSceneIsACut) {
  const cv::Mat a = smooth_texture({400, 200}, 10);
  cv::Mat b = smooth_texture({400, 200}, 11);
  cv::cvtColor(b, b, cv::COLOR_BGR2RGB);  // other colours too
  b.convertTo(b, -1, 0.6, 60);
  SyntheticSource source(30, 24, [&](int64_t i) {
    return i < 15 ? view(a, 1.0 * i, 0, kFrame) : view(b, 1.0 * i, 0, kFrame);
  });
  const Report r = run(source);
  auto cuts = segments_of(r, "cut");
  ASSERT_EQ(cuts.size(), 1u);
  EXPECT_EQ(cuts[0].start_frame, 15);
  EXPECT_EQ(cuts[0].end_frame, 15);
  // Across the cut, frame-to-frame measures are undefined (the cut is
  // reported once, as a cut) and flicker restarts with the new shot.
  EXPECT_TRUE(std::isnan(r.find_series("warp_error")->values[15]));
  EXPECT_TRUE(std::isnan(r.find_series("flicker")->values[15]));
  EXPECT_TRUE(segments_of(r, "flicker").empty());
  EXPECT_TRUE(segments_of(r, "warp_error").empty());
}

TEST(Pipeline, ResultsDoNotDependOnTheThreadCount) {
  const cv::Mat texture = smooth_texture({400, 200}, 12);
  auto make = [&](int64_t i) { return view(texture, 1.7 * i, 0.3 * i, kFrame); };
  SyntheticSource one(25, 24, make), two(25, 24, make), three(25, 24, make);
  const auto a = report_to_json(run(one, 1));
  EXPECT_EQ(a, report_to_json(run(two, 2)));
  EXPECT_EQ(a, report_to_json(run(three, 3)));
}

TEST(Pipeline, LongRangeWarpErrorGrowsWithTheSpanOfASlowChange) {
  // Source: the warping error's definition (Lai et al., ECCV 2018: squared
  // RGB differences over consistent pixels, summed over channels, as
  // README's metric table states), worked by hand here.
  // In a still scene a patch brightens by 2 levels per frame. One step sees a
  // 2-level change, the k=5 chain a 10-level one: by that definition
  // (squared differences) the long-range error is k^2 = 25 times
  // the single-step error, and both equal 3 (d/255)^2 times the patch's share
  // of the frame.
  const cv::Mat texture = smooth_texture({400, 200}, 13);
  SyntheticSource source(30, 24, [&](int64_t i) {
    cv::Mat f = view(texture, 0, 0, kFrame);
    f(cv::Rect(60, 30, 60, 40)) += cv::Scalar::all(2.0 * i);
    return f;
  });
  const Report r = run(source);
  const auto& one = r.find_series("warp_error")->values;
  const auto& five = r.find_series("warp_error_long")->values;
  for (int t = 0; t < 5; ++t) EXPECT_TRUE(std::isnan(five[t])) << t;
  double ratio_sum = 0;
  int n = 0;
  for (int t = 10; t < 30; ++t, ++n) ratio_sum += five[t] / one[t];
  EXPECT_NEAR(ratio_sum / n, 25.0, 2.5);
  const double share = 60.0 * 40.0 / (kFrame.width * kFrame.height);
  EXPECT_NEAR(one[20], 3 * std::pow(2 / 255.0, 2) * share,
              0.2 * 3 * std::pow(2 / 255.0, 2) * share);
  EXPECT_NEAR(five[20], 3 * std::pow(10 / 255.0, 2) * share,
              0.2 * 3 * std::pow(10 / 255.0, 2) * share);
}

// Frames the decoder side holds at once, counted by its pool of frames. A
// GIF storing each picture 3 times: the cadence filter holds frames 1..29
// until it decides (cadence_filter_test.cpp counts them); only the 9 new
// pictures among them keep their planes, the repeats keep their
// differences (none here). Worked by hand, after the decision: those 9,
// frame 29 (just decoded, and the filter's last frame, compared with the
// next), frame 0 and frame 3 (the reader below pops one while holding the
// one before): 12, and 4 more of slack for the threads' order. Holding the
// repeats whole made 30.
TEST(Pipeline, DecodedFramesHeldWhileTheCadenceIsDecidedAreBounded) {
  const cv::Mat texture = smooth_texture({400, 200}, 11);
  SyntheticSource source(48, 24, [&](int64_t i) {
    return view(texture, 4.0 * static_cast<double>(i / 3), 0, kFrame);
  });
  FrameStream stream(source, 2);
  std::shared_ptr<const FramePlanes> frame;
  int64_t frames = 0;
  while (auto next = stream.next()) {
    frame = std::move(next);  // the reader holds one frame at a time
    ++frames;
  }
  EXPECT_EQ(frames, 16);
  ASSERT_TRUE(stream.cadence().cadence(2.0));
  EXPECT_EQ(stream.cadence().cadence(2.0)->usual_repeats, 2);
  EXPECT_LE(stream.frames_held_peak(), 16u);
  EXPECT_GE(stream.frames_held_peak(), 11u);  // the 9 pictures held, the decoder's and the reader's
}
