// boiling against its defining statistic (analyzer/metrics/boiling_metric.cpp).
// Outside sources: the real photograph opencv-doc baboon.jpg as the scene, a
// camera pan over it by a known translation, OpenCV's DIS flow through the
// full pipeline; and the elementary identity behind the metric: for noise
// n_t drawn afresh each frame with variance s^2 per channel,
// E[(n_t - n_{t-1}) . (n_{t+1} - n_t)] = -s^2, so three channels of noise of
// 8-bit standard deviation sigma read 3 (sigma/255)^2 - after the metric's
// 3 x 3 mean, which keeps a share of the noise variance that follows from
// the noise's own scale (worked out below, elementary variance of a mean).
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <random>
#include <string>

#include <opencv2/imgproc.hpp>

#include "clipwarden/analysis.h"
#include "clipwarden/policy.h"
#include "support/clips.h"
#include "support/drift_scenes.h"
#include "support/synthetic_source.h"

namespace clipwarden::test {
namespace {

constexpr double kFps = 24;
constexpr int kFrames = 48;
// Noise frames of the local case: a defect in the middle of the clip.
constexpr int kNoiseFirst = 16, kNoiseLast = 35;
const cv::Size kFrame(512, 384);               // working size: windows of 64 px, blocks of 16 px
const cv::Rect kNoiseBox(128, 128, 128, 128);  // room for whole windows inside

// The camera pans right over the photograph by a whole 2 px per frame;
// noise is added to every frame inside `box` (frame coordinates), fresh
// each frame, with a fixed seed per frame. A whole-pixel motion keeps the
// identity exact: warping by a fraction of a pixel interpolates, and the
// interpolated sum of independent pixel noise has less variance (half at a
// half-pixel shift: 0.5^2 + 0.5^2), which smooth real grain barely feels.
// `blob` > 1 draws the noise on a grid of blob x blob squares (each square
// one value), as generated textures boil in blobs; 1 is pixel-fine noise,
// like film grain.
Report analyse_pan(const cv::Mat& scene, double sigma, cv::Rect box, int first = 0,
                   int last = kFrames - 1, int blob = 1) {
  fixtures::SyntheticSource source(kFrames, kFps, [&](int64_t i) {
    cv::Mat frame;
    const cv::Mat shift = (cv::Mat_<double>(2, 3) << 1, 0, -2.0 * static_cast<double>(i), 0, 1, 0);
    cv::warpAffine(scene, frame, shift, kFrame, cv::INTER_LINEAR, cv::BORDER_REFLECT);
    if (sigma > 0 && i >= first && i <= last) {
      cv::Mat coarse((box.height + blob - 1) / blob, (box.width + blob - 1) / blob, CV_16SC1),
          noise;
      cv::RNG rng(static_cast<uint64_t>(1000 + i));
      rng.fill(coarse, cv::RNG::NORMAL, 0, sigma);
      cv::resize(coarse, noise, cv::Size(coarse.cols * blob, coarse.rows * blob), 0, 0,
                 cv::INTER_NEAREST);
      noise = noise(cv::Rect(cv::Point(0, 0), box.size())).clone();
      cv::Mat noise3;
      cv::merge(std::vector<cv::Mat>{noise, noise, noise}, noise3);
      cv::Mat region;
      frame(box).convertTo(region, CV_16SC3);
      region += noise3;
      region.convertTo(frame(box), CV_8UC3);  // saturates at 0 and 255
    }
    return frame;
  });
  AnalysisSettings settings;
  settings.working_long_side = kFrame.width;
  auto report = analyze_source(source, "pan", settings, default_policy());
  if (!report) throw std::runtime_error(report.error().message());
  return std::move(*report);
}

double median_defined(const Report& r, const char* metric, int first = 0, int last = kFrames - 1) {
  std::vector<double> v;
  const auto& values = r.find_series(metric)->values;
  for (int i = first; i <= last && i < static_cast<int>(values.size()); ++i)
    if (!std::isnan(values[i])) v.push_back(values[i]);
  if (v.empty()) return NAN;
  std::nth_element(v.begin(), v.begin() + v.size() / 2, v.end());
  return v[v.size() / 2];
}

cv::Mat scene_or_skip() {
  cv::Mat baboon = load_sample_image("baboon.jpg");
  if (baboon.empty()) return {};
  cv::Mat scene;
  cv::resize(baboon, scene, cv::Size(), 1.4, 1.4, cv::INTER_AREA);  // 717 px: room to pan
  return scene;
}

// The metric averages the residual over 3 x 3 pixels. The mean of 9
// independent values keeps 1/9 of their variance. Noise constant on 4 x 4
// squares (aligned with the pixel grid) keeps, per axis, the average over
// the 4 positions in a square of the summed squared weights of the squares
// the 3-pixel window touches: (5/9 + 1 + 1 + 5/9) / 4 = 7/9, so (7/9)^2 =
// 49/81 in two dimensions. A whole-pixel pan leaves both shares as they are.
constexpr double kPixelNoiseShare = 1.0 / 9, kBlobNoiseShare = 49.0 / 81;

TEST(BoilingReference, FreshBlobNoiseInFourCellsReadsThreeSigmaSquaredTimesItsShare) {
  const cv::Mat scene = scene_or_skip();
  if (scene.empty()) GTEST_SKIP() << "opencv-doc baboon.jpg not installed";
  const double sigma = 10;
  const Report r = analyse_pan(scene, sigma, kNoiseBox, kNoiseFirst, kNoiseLast, 4);
  const double expected = 3 * std::pow(sigma / 255.0, 2) * kBlobNoiseShare;  // 0.00279
  // From the second noisy frame on, both residuals carry the noise.
  const double measured = median_defined(r, "boiling", kNoiseFirst + 2, kNoiseLast);
  std::printf("boiling, 4 px blobs: measured median %.5f, expected %.5f\n", measured, expected);
  // The flow fits a little of the noise and the check drops some noisy
  // pixels; 30% covers both (measured: see the printout).
  EXPECT_NEAR(measured, expected, 0.3 * expected);
  const auto segment = std::find_if(r.segments.begin(), r.segments.end(), [](const Segment& s) {
    return s.metric == "boiling" && s.severity != Severity::info;
  });
  ASSERT_NE(segment, r.segments.end()) << "the default policy reviews blob noise of sigma 10";
  EXPECT_NEAR(segment->start_frame, kNoiseFirst + 1, 2);
  EXPECT_NEAR(segment->end_frame, kNoiseLast + 1, 2);
}

TEST(BoilingReference, PixelFineNoiseReadsANinthAndIsNotBoiling) {
  // Film grain and sensor noise are fresh every frame too, but pixel-fine.
  const cv::Mat scene = scene_or_skip();
  if (scene.empty()) GTEST_SKIP() << "opencv-doc baboon.jpg not installed";
  const double sigma = 8;
  const Report r = analyse_pan(scene, sigma, kNoiseBox, kNoiseFirst, kNoiseLast);
  const double expected = 3 * std::pow(sigma / 255.0, 2) * kPixelNoiseShare;  // 0.00033
  const double measured = median_defined(r, "boiling", kNoiseFirst + 2, kNoiseLast);
  std::printf("boiling, pixel noise: measured median %.5f, expected %.5f\n", measured, expected);
  EXPECT_NEAR(measured, expected, 0.3 * expected);
  for (const auto& s : r.segments)
    if (s.metric == "boiling") EXPECT_EQ(s.severity, Severity::info) << s.start_frame;
}

TEST(BoilingReference, CleanPanAndFrameWideGrainReadNearZero) {
  const cv::Mat scene = scene_or_skip();
  if (scene.empty()) GTEST_SKIP() << "opencv-doc baboon.jpg not installed";
  const Report clean = analyse_pan(scene, 0, kNoiseBox);
  // Grain over the whole frame raises every cell alike: not a local defect.
  const Report grain = analyse_pan(scene, 8, cv::Rect(cv::Point(0, 0), kFrame));
  const double one_sigma = 3 * std::pow(1 / 255.0, 2);  // what noise of sigma 1 would read
  EXPECT_LT(median_defined(clean, "boiling"), 2 * one_sigma);
  // What remains is the spread of the windows' estimates: the largest of
  // about 600 overlapping windows (each the median of 16 blocks of 64
  // sampled products) minus the median window. Measured 0.26 of what the
  // same noise reads when it is local; a third bounds it.
  EXPECT_LT(median_defined(grain, "boiling"), 0.34 * 3 * std::pow(8 / 255.0, 2) * kPixelNoiseShare);
  for (const auto* r : {&clean, &grain})
    for (const auto& s : r->segments) EXPECT_NE(s.metric, "boiling") << s.start_frame;
}

// Film grain made by an outside tool: FFmpeg's `noise` filter with
// temporal noise (allf=t: a new pattern every frame, from a fixed seed) over opencv-doc's
// photograph baboon.jpg held still for 2 s. Grain is fresh every frame
// everywhere and pixel-fine, so it is no boiling. A patch whose texture is
// re-drawn every frame at the scale of a few pixels for part of the clip
// (FFmpeg's noise on a 32 px crop, scaled 4x by pixel repetition, laid back
// over the picture) is.
Report analyse_ffmpeg_still(const std::string& clip, const std::string& filter) {
  const std::string picture = *test::opencv_data("baboon.jpg");
  const CommandResult made = run_command({"ffmpeg", "-v", "error", "-y", "-loop", "1", "-framerate",
                                          "24", "-i", picture, "-t", "2", "-filter_complex", filter,
                                          "-pix_fmt", "yuv444p", "-c:v", "ffv1", clip});
  if (made.exit_code != 0) throw std::runtime_error("ffmpeg: " + made.err);
  AnalysisSettings settings;
  settings.working_long_side = kFrame.width;
  auto report = analyze_clip(clip, settings, default_policy());
  if (!report) throw std::runtime_error(report.error().message());
  return std::move(*report);
}

std::vector<const Segment*> boiling_reviews(const Report& r) {
  std::vector<const Segment*> out;
  for (const auto& s : r.segments)
    if (s.metric == "boiling" && s.severity != Severity::info) out.push_back(&s);
  return out;
}

TEST(BoilingReference, FfmpegFilmGrainOnAStillPhotographIsNotBoilingButARedrawnPatchIs) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  if (!test::opencv_data("baboon.jpg")) GTEST_SKIP() << "opencv-doc baboon.jpg not installed";
  const TempDir dir;
  // Strength 20 of FFmpeg's noise filter: grain as heavy as on an archival
  // film (a spread of about +-20 code values per pixel).
  const Report grain = analyse_ffmpeg_still(dir.file("grain.mkv"),
                                            "[0]scale=512:384,noise=alls=20:allf=t:all_seed=1");
  EXPECT_TRUE(boiling_reviews(grain).empty())
      << "film grain read as boiling, peak " << boiling_reviews(grain).front()->peak;
  // The patch is re-drawn over frames 16-35 only: a texture that boils
  // in one place for the whole clip is that place's quiet level, as water
  // or foliage is (docs/detectors.md).
  const Report patch = analyse_ffmpeg_still(
      dir.file("patch.mkv"),
      "[0]scale=512:384,noise=alls=20:allf=t:all_seed=1,split[bg][p];"
      "[p]crop=32:32:192:160,noise=alls=40:allf=t:all_seed=2,scale=128:128:flags=neighbor[q];"
      "[bg][q]overlay=192:160:enable='between(n,16,35)'");
  const auto reviews = boiling_reviews(patch);
  ASSERT_FALSE(reviews.empty()) << "a patch re-drawn every frame over the grain was not reviewed";
  // From the second re-drawn frame on, both residuals carry the new texture;
  // nothing is reviewed outside the re-drawn frames.
  for (const Segment* r : reviews)
    std::printf("boiling review over frames %lld-%lld, peak %.4f\n",
                static_cast<long long>(r->start_frame), static_cast<long long>(r->end_frame),
                r->peak);
  EXPECT_NEAR(reviews.front()->start_frame, 17, 2);
  EXPECT_NEAR(reviews.back()->end_frame, 36, 2);
}


// Sun glints: white points of 4 x 4 px that appear and vanish every frame
// over 5% of a 128 px patch, drawn with FFmpeg's geq (positions from a
// hash of x, y and the frame number, the same in all three planes, so the
// points are white) over frames 16-35. Each point is narrower than the
// metric's 7 px square, so it is a sparkle point and its residual is
// clipped to 48 codes per channel. Worked value (elementary probability):
// a point lit at t-1 and dark at t has residuals of opposite sign, so it
// adds 3 (48/255)^2 = 0.106 to the product; that happens on p (1 - p) =
// 4.75% of the patch, times the 49/81 that the 3 x 3 mean keeps of 4 px
// blobs: about 0.0030. Unclipped, a point 150-200 codes above the
// photograph would add 3 (175/255)^2 = 1.41 instead: 0.041 (the metric
// read 0.035 before the clip, measured 2026-12-05). A dense field of pure
// white glints still reviews; the pool's glints, softer and sparser, no
// longer do (boiling_glints_footage_test.cpp).
TEST(BoilingReference, FfmpegGlintsWeighNoMoreThanTheClippedResidual) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  if (!test::opencv_data("baboon.jpg")) GTEST_SKIP() << "opencv-doc baboon.jpg not installed";
  const TempDir dir;
  const std::string lit = "lt(abs(mod(sin(X*12.9898+Y*78.233+N*37.719)*43758.5453\\,1))\\,0.05)";
  const Report glints = analyse_ffmpeg_still(
      dir.file("glints.mkv"),
      "[0]scale=512:384,format=yuv444p,split[bg][p];"
      "[p]crop=32:32:192:160,geq=lum='if(" + lit + ",255,lum(X,Y))':cb='if(" + lit +
          ",128,cb(X,Y))':cr='if(" + lit + ",128,cr(X,Y))',scale=128:128:flags=neighbor[q];"
      "[bg][q]overlay=192:160:enable='between(n,16,35)'");
  double peak = 0;
  for (const auto& s : glints.segments)
    if (s.metric == "boiling") peak = std::max(peak, s.peak);
  const double clipped = 3 * std::pow(48.0 / 255, 2) * 0.05 * 0.95 * kBlobNoiseShare;
  const double unclipped = 3 * std::pow(175.0 / 255, 2) * 0.05 * 0.95 * kBlobNoiseShare;
  EXPECT_GT(peak, clipped / 2) << "the glints are re-drawn every frame: they must still read";
  EXPECT_LT(peak, clipped * 2) << "unclipped they would read about " << unclipped;
}

}  // namespace
}  // namespace clipwarden::test
