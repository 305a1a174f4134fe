// Drift's frame features (analyzer/drift/frame_features.h) compute the
// gradient a band of rows at a time to hold less memory; the values must be
// exactly those of OpenCV's Sobel and cartToPolar over the whole plane, the
// published recipe the features follow (sigma-1 Gaussian, 3x3 Sobel scaled
// by 1/8, magnitude and signed orientation).
#include <gtest/gtest.h>

#include <cmath>
#include <cstring>

#include <opencv2/imgproc.hpp>

#include "analyzer/drift/frame_features.h"

namespace clipwarden::drift {
namespace {

// Textured gray and colour planes whose height is no multiple of the band:
// noise over a diagonal ramp, with a sharp edge across a band boundary.
void textured_frame(cv::Mat& gray, cv::Mat& bgr) {
  const cv::Size size(203, 117);
  gray.create(size, CV_8UC1);
  cv::RNG rng(7);
  rng.fill(gray, cv::RNG::UNIFORM, 0, 40);
  for (int y = 0; y < size.height; ++y)
    for (int x = 0; x < size.width; ++x)
      gray.at<uint8_t>(y, x) += static_cast<uint8_t>((x + 2 * y) / 3);
  gray(cv::Rect(50, 28, 80, 9)).setTo(250);  // rows 28-36: across the boundary at 32
  cv::cvtColor(gray, bgr, cv::COLOR_GRAY2BGR);
}

bool same_bits(const cv::Mat& a, const cv::Mat& b) {
  if (a.size() != b.size() || a.type() != b.type()) return false;
  for (int y = 0; y < a.rows; ++y)
    if (std::memcmp(a.ptr(y), b.ptr(y), a.cols * a.elemSize()) != 0) return false;
  return true;
}

// The reference: the same OpenCV calls on whole planes.
void whole_plane_gradient(const cv::Mat& gray, cv::Mat& magnitude, cv::Mat& angle) {
  cv::Mat smoothed, gx, gy;
  cv::GaussianBlur(gray, smoothed, cv::Size(5, 5), 1.0, 1.0, cv::BORDER_REPLICATE);
  cv::Sobel(smoothed, gx, CV_32F, 1, 0, 3, 1.0 / 8.0, 0, cv::BORDER_REPLICATE);
  cv::Sobel(smoothed, gy, CV_32F, 0, 1, 3, 1.0 / 8.0, 0, cv::BORDER_REPLICATE);
  cv::cartToPolar(gx, gy, magnitude, angle, false);
}

TEST(DriftFrameFeatures, BandedGradientEqualsWholePlaneOpenCv) {
  cv::Mat gray, bgr;
  textured_frame(gray, bgr);
  FrameFeatures features;
  features.compute(3, gray, bgr, 2);

  cv::Mat magnitude, angle;
  whole_plane_gradient(gray, magnitude, angle);

  EXPECT_TRUE(same_bits(features.magnitude(), magnitude));
  EXPECT_TRUE(same_bits(features.angle(), angle));
  // Not a trivially flat plane: the edge gives large gradients.
  double largest = 0;
  cv::minMaxLoc(magnitude, nullptr, &largest);
  EXPECT_GT(largest, 20.0);
}

// A buffer reused for a frame of another size gives that frame's values.
TEST(DriftFrameFeatures, ReusedForAnotherSize) {
  cv::Mat gray, bgr;
  textured_frame(gray, bgr);
  FrameFeatures features;
  features.compute(0, gray, bgr, 2);
  const cv::Mat small_gray = gray(cv::Rect(0, 0, 64, 40)).clone(),
                small_bgr = bgr(cv::Rect(0, 0, 64, 40)).clone();
  features.compute(1, small_gray, small_bgr, 2);
  cv::Mat magnitude, angle;
  whole_plane_gradient(small_gray, magnitude, angle);
  EXPECT_TRUE(same_bits(features.magnitude(), magnitude));
  EXPECT_TRUE(same_bits(features.angle(), angle));
}

// The local orientation histogram is HOG's soft binning (Dalal & Triggs,
// CVPR 2005): each gradient votes its magnitude into the two orientation
// bins nearest its angle, split linearly; here 12 signed bins of 30
// degrees, angles measured from the object's rotation and wrapped into
// [0, 360). The reference below computes that definition in double
// precision from the feature planes; the histogram takes an in-range
// orientation without the wrap, and a rotation moves orientations below 0
// and past 360, so both ways are compared.
TEST(DriftFrameFeatures, LocalHistogramIsSoftBinnedOrientation) {
  cv::Mat gray, bgr;
  textured_frame(gray, bgr);
  FrameFeatures features;
  features.compute(0, gray, bgr, 2);
  const cv::Point2f at(61.4f, 30.6f);  // on the bright edge and the ramp
  const int radius = 5, stride = 2;
  for (const float rotation : {0.0f, 1.3f, -2.2f, 7.0f}) {
    double expected[kOrientationBins] = {};
    double total = 0;
    const int cx = 61, cy = 31;
    for (int y = cy - radius; y <= cy + radius; y += stride) {
      for (int x = cx - radius; x <= cx + radius; x += stride) {
        const double m = features.magnitude().at<float>(y, x);
        if (m <= 0) continue;
        double pos = (features.angle().at<float>(y, x) - rotation) * kOrientationBins / (2 * M_PI);
        pos = std::fmod(pos, kOrientationBins);
        if (pos < 0) pos += kOrientationBins;
        const int lo = static_cast<int>(pos) % kOrientationBins;
        const double frac = pos - std::floor(pos);
        expected[lo] += m * (1 - frac);
        expected[(lo + 1) % kOrientationBins] += m * frac;
        total += m;
      }
    }
    OrientationHistogram hist;
    const float mass = features.local_histogram(at, radius, stride, rotation, hist);
    EXPECT_NEAR(mass, total, 1e-4 * total) << "rotation " << rotation;
    for (int k = 0; k < kOrientationBins; ++k)
      EXPECT_NEAR(hist[k], expected[k], 1e-3 + 1e-4 * total) << "bin " << k << ", rotation " << rotation;
  }
}

}  // namespace
}  // namespace clipwarden::drift
