// Whether a block holds still while its light changes (still_light_fit.h).
// Outside anchors: surfaces given by a formula, sampled exactly where a
// translation puts them (s(x + dx, y) is the surface moved by -dx), and the
// brightness-change model of Negahdaripour (IEEE PAMI 20(9), 1998), under
// which a gain and an offset change no motion estimate.
#include <gtest/gtest.h>

#include <cmath>
#include <functional>

#include <opencv2/core.hpp>

#include "analyzer/metrics/still_light_fit.h"

using namespace clipwarden;

namespace {

constexpr double kPi = 3.14159265358979323846;

// A plane whose pixel (x, y) holds f(x, y).
cv::Mat sampled(const std::function<double(double, double)>& f, int size = 64) {
  cv::Mat m(size, size, CV_32F);
  for (int y = 0; y < size; ++y)
    for (int x = 0; x < size; ++x) m.at<float>(y, x) = static_cast<float>(f(x, y));
  return m;
}

// A surface with texture in both directions (periods 16 and 12 px, mean 0.3).
double texture(double x, double y) {
  return 0.3 + 0.1 * std::sin(2 * kPi * x / 16) * std::cos(2 * kPi * y / 12) +
         0.05 * std::cos(2 * kPi * (x + y) / 20);
}

StillLightFit fit_one(const cv::Mat& cur, const cv::Mat& prev) {
  const cv::Mat valid(prev.size(), CV_8U, cv::Scalar(255));
  return block_still_light_fit(cur, prev, valid, 1, 1, 0.02f, 0.75f, 0.02f)[0];
}

}  // namespace

TEST(StillLightFit, AGainAndAnOffsetAreLightNotMotion) {
  const cv::Mat prev = sampled(texture);
  const cv::Mat cur = prev * 1.25 + 0.01;
  const StillLightFit f = fit_one(cur, prev);
  EXPECT_TRUE(f.motion_observable);
  EXPECT_NEAR(f.motion_px, 0.0, 1e-3);
  EXPECT_NEAR(f.residual_spread, 0.0, 1e-3);
  // (0.25 w + 0.01) / w over the block: 0.25 + 0.01 / mean(w).
  EXPECT_NEAR(f.mean_change, 0.25 + 0.01 / cv::mean(prev)[0], 1e-3);
}

TEST(StillLightFit, MotionIsReadTheSameUnderAChangeOfLight) {
  const cv::Mat prev = sampled(texture);
  // The surface moved by half a pixel to the left: cur(x) = s(x + 0.5).
  // The estimate is linear in the shift (first-order Taylor term), exact up
  // to the surface's curvature over half a pixel: a few percent here.
  const cv::Mat moved = sampled([](double x, double y) { return texture(x + 0.5, y); });
  const StillLightFit plain = fit_one(moved, prev);
  EXPECT_NEAR(plain.motion_px, 0.5, 0.05);
  EXPECT_LT(plain.residual_spread, 0.01);
  // The same motion while the light rises by 30% and a glow is added. To
  // first order cur - w = a + g w + (1 + g) grad(w) . shift: the glow and
  // the gain's own term are partialled out, and the gain scales the motion
  // term, so the estimate reads (1 + g) times the shift, 1.3 x here.
  const StillLightFit lit = fit_one(moved * 1.3 + 0.02, prev);
  EXPECT_NEAR(lit.motion_px, 1.3 * plain.motion_px, 0.02);
  EXPECT_LT(lit.residual_spread, 0.01);
  // A motion of two pixels is no longer a small one: either it reads above
  // the 0.75 px of a mover or it leaves a pattern the fit cannot explain.
  const cv::Mat far = sampled([](double x, double y) { return texture(x + 2, y + 1); });
  const StillLightFit big = fit_one(far, prev);
  EXPECT_TRUE(big.motion_px > 0.75f || big.residual_spread > 0.02f)
      << big.motion_px << " " << big.residual_spread;
}

TEST(StillLightFit, ARampOrAFlatBlockCannotVouchForItsStillness) {
  // A uniform ramp sliding along itself changes every pixel by the same
  // amount, which an offset explains as well as a motion: not observable.
  const cv::Mat ramp = sampled([](double x, double) { return 0.1 + 0.004 * x; });
  EXPECT_FALSE(fit_one(ramp + 0.004, ramp).motion_observable);
  const cv::Mat flat(64, 64, CV_32F, cv::Scalar(0.3));
  const StillLightFit f = fit_one(flat * 1.2, flat);
  EXPECT_FALSE(f.motion_observable);
  EXPECT_TRUE(std::isnan(f.motion_px));
  EXPECT_NEAR(f.mean_change, 0.2, 1e-5);
}

TEST(StillLightFit, FewerThanHalfThePixelsValidIsUnknown) {
  const cv::Mat prev = sampled(texture);
  cv::Mat valid(64, 64, CV_8U, cv::Scalar(0));
  valid(cv::Rect(0, 0, 64, 20)).setTo(255);
  const StillLightFit f = block_still_light_fit(prev, prev, valid, 1, 1, 0.02f, 0.75f, 0.02f)[0];
  EXPECT_TRUE(std::isnan(f.mean_change));
  EXPECT_FALSE(f.motion_observable);
}

TEST(CameraWarp, ATranslationOfTheCameraIsUndone) {
  // The camera moves the picture by (3, -2) px from prev to cur, so the
  // warped previous frame at x holds prev at (x - 3, y + 2).
  const cv::Mat prev = sampled(texture);
  const cv::Matx33d camera(1, 0, 3, 0, 1, -2, 0, 0, 1);
  cv::Mat warped, valid;
  camera_warp(prev, camera, warped, valid);
  EXPECT_NEAR(warped.at<float>(30, 40), texture(37, 32), 1e-5);
  EXPECT_NEAR(warped.at<float>(10, 10), texture(7, 12), 1e-5);
  // Columns left of x = 3 and rows below y = 62 come from outside the
  // previous frame; one more pixel is dropped for the gradients.
  EXPECT_EQ(valid.at<uint8_t>(30, 2), 0);
  EXPECT_EQ(valid.at<uint8_t>(30, 3), 0);
  EXPECT_EQ(valid.at<uint8_t>(30, 4), 255);
  EXPECT_EQ(valid.at<uint8_t>(61, 30), 0);
  EXPECT_EQ(valid.at<uint8_t>(60, 30), 255);
}
