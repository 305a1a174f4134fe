// The smoothed warping error (warp_error_smooth): the warping error after a
// Gaussian blur of both pictures. Outside anchors: the response of OpenCV's
// pyrDown kernel and sampled Gaussian kernel (getGaussianKernel's formula)
// on a dither pattern, worked out below; and real footage from the
// evaluation corpus (CLIPWARDEN_CORPUS; skipped without it).
#include <gtest/gtest.h>

#include <cmath>
#include <string>
#include <utility>

#include <opencv2/core.hpp>
#include <opencv2/imgproc.hpp>

#include "analyzer/metrics/image_error.h"
#include "clipwarden/report.h"
#include "support/corpus.h"

namespace clipwarden::test {
namespace {

// A grey picture with a checkerboard of +-amplitude in squares of 2 px: the
// finest pattern a palette's dithering draws (one pixel) in a 256 px GIF,
// as the analysis sees it at its 512 px working size. `phase` 1 swaps the
// squares.
cv::Mat checkerboard(int amplitude, int phase) {
  cv::Mat img(64, 64, CV_8UC3);
  for (int y = 0; y < img.rows; ++y)
    for (int x = 0; x < img.cols; ++x) {
      const int v = 128 + (((x / 2 + y / 2 + phase) % 2) ? amplitude : -amplitude);
      img.at<cv::Vec3b>(y, x) = cv::Vec3b(v, v, v);
    }
  return img;
}

TEST(WarpErrorSmoothReference, DitherThatFlipsVanishesAndARegionalChangeStays) {
  const cv::Mat mask(64, 64, CV_8UC1, cv::Scalar(255));
  // A dither pattern drawn anew (phase flipped) between two pictures of the
  // same scene: every pixel changes by 96 levels, warp error 3 * (96/255)^2.
  const cv::Mat a = checkerboard(48, 0), b = checkerboard(48, 1);
  EXPECT_NEAR(masked_squared_rgb_error(a, b, mask), 3 * std::pow(96.0 / 255, 2), 1e-12);
  // Worked example: at the metric's sigma of 2 px the blur is pyrDown's
  // [1 4 6 4 1]/16 (variance 1 px^2), whose gain on a pattern of period
  // 4 px is (6 - 2) / 16 = 0.25 per axis, then sigma sqrt(3)/2 = 0.87 px
  // at half size, where the pattern falls at the Nyquist rate: OpenCV takes
  // round(8 sigma + 1) | 1 = 9 taps for float pictures (recalled from its
  // source), exp(-k^2 / 1.5), k = -4..4, sum 2.1708, gain sum (-1)^k
  // exp(-k^2 / 1.5) / 2.1708 = 0.049. The 96-level difference keeps about
  // 96 * (0.25 * 0.049)^2 = 0.015 level, far below one level; the border's
  // reflection, which breaks the pattern, stays below one level too.
  EXPECT_LT(smoothed_squared_rgb_error(a, b, mask, kWarpSmoothSigmaPx), 3 * std::pow(1.0 / 255, 2));
  // A blur of 0.5 px (5 taps exp(-2 k^2)) passes the same pattern with a
  // gain of 0.786 per axis: 0.786^4 = 0.38 of its squared difference stays.
  EXPECT_GT(smoothed_squared_rgb_error(a, b, mask, 0.5), 0.1 * masked_squared_rgb_error(a, b, mask));
  // A change over a whole region (every pixel 20 levels brighter) survives
  // the blur whole: a blurred constant is the same constant.
  cv::Mat brighter = a + cv::Scalar(20, 20, 20);
  EXPECT_NEAR(smoothed_squared_rgb_error(a, brighter, mask, kWarpSmoothSigmaPx), 3 * std::pow(20.0 / 255, 2),
              1e-9);
}

// The half-size shortcut against OpenCV's full-size Gaussian blur of the
// difference (GaussianBlur, sigma 2, in float): on a difference with
// detail at every scale (uniform noise, which a warped pair's residual
// never exceeds) the means agree within 3%; measured 2026-12-05 on real
// consecutive frames, the median pair within 1% (docs/accuracy.md).
TEST(WarpErrorSmoothReference, HalfSizeBlurMatchesTheFullSizeBlur) {
  cv::RNG rng(20261205);
  cv::Mat a(288, 512, CV_8UC3), b(288, 512, CV_8UC3);
  rng.fill(a, cv::RNG::UNIFORM, 0, 256);
  rng.fill(b, cv::RNG::UNIFORM, 0, 256);
  cv::Mat mask(a.size(), CV_8UC1, cv::Scalar(255));
  mask(cv::Rect(100, 50, 200, 120)).setTo(0);  // an occluded block, as the flow check leaves
  cv::Mat diff, blurred, squared;
  cv::subtract(a, b, diff, cv::noArray(), CV_32F);
  cv::GaussianBlur(diff, blurred, cv::Size(0, 0), kWarpSmoothSigmaPx);
  cv::multiply(blurred, blurred, squared);
  const cv::Scalar per_channel = cv::mean(squared, mask);
  const double reference = (per_channel[0] + per_channel[1] + per_channel[2]) / (255.0 * 255.0);
  EXPECT_NEAR(smoothed_squared_rgb_error(a, b, mask, kWarpSmoothSigmaPx), reference, 0.03 * reference);
}

double smooth_ratio_p50(const Report& r) {
  const MetricSummary* s = r.find_summary("warp_error_smooth_ratio");
  return s ? s->p50 : kUndefined;
}

// AnimateDiff v3's fireworks portrait (a 256 px GIF, corpus): its palette's
// dithering is re-drawn in every picture, and warp_error_ratio's clip median
// read 3.28, a reject at 3 before 2026-12-05. Smoothed, the median reads
// 1.32 (measured 2026-12-05): it must stay below the reject level of 2 and
// the clip may no longer be rejected.
TEST(WarpErrorSmoothFootage, ADitheredGifIsNotRejectedForItsPalette) {
  const std::string clip = corpus_clip("gen_animatediff_v3_fireworks.gif");
  if (clip.empty()) GTEST_SKIP() << "evaluation corpus not found (set CLIPWARDEN_CORPUS)";
  const Report r = analyse_with_defaults(clip);
  EXPECT_LT(smooth_ratio_p50(r), 1.6) << "measured 1.32";
  EXPECT_NE(r.verdict.status, Verdict::reject);
}

// Text2Video-Zero's dancing bear and astronaut (corpus): poses jump and
// backgrounds are re-drawn every frame, defects seen by eye over whole
// regions, which the blur keeps: smoothed clip medians of 4.22 and 2.44
// (measured 2026-12-05), floors 20% below, both still rejected.
TEST(WarpErrorSmoothFootage, RegionsRedrawnEveryFrameStayRejected) {
  for (const auto& [file, floor] : {std::pair{"gen_t2vzero_bear_dancing.gif", 3.4},
                                    std::pair{"gen_t2vzero_astronaut.gif", 1.95}}) {
    const std::string clip = corpus_clip(file);
    if (clip.empty()) GTEST_SKIP() << "evaluation corpus not found (set CLIPWARDEN_CORPUS)";
    const Report r = analyse_with_defaults(clip);
    EXPECT_GT(smooth_ratio_p50(r), floor) << file;
    EXPECT_EQ(r.verdict.status, Verdict::reject) << file;
  }
}

}  // namespace
}  // namespace clipwarden::test
