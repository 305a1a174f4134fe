// drift::box_mean against the OpenCV function it replaces: cv::blur with a
// (2r+1)^2 window and BORDER_REPLICATE on 8-bit planes must give the same
// bytes, for every radius it handles itself, one and three channels, and
// planes smaller than the window.
#include <gtest/gtest.h>

#include <opencv2/imgproc.hpp>

#include "analyzer/drift/box_mean.h"

namespace framelint::drift {
namespace {

void expect_same_as_blur(const cv::Mat& src, int radius) {
  cv::Mat expected, actual;
  std::vector<uint16_t> scratch;
  const int side = 2 * radius + 1;
  cv::blur(src, expected, cv::Size(side, side), cv::Point(-1, -1), cv::BORDER_REPLICATE);
  box_mean(src, radius, actual, scratch);
  ASSERT_EQ(actual.type(), expected.type());
  ASSERT_EQ(actual.size(), expected.size());
  EXPECT_EQ(cv::norm(actual, expected, cv::NORM_INF), 0)
      << src.cols << "x" << src.rows << " channels " << src.channels() << " radius " << radius;
}

TEST(DriftBoxMean, MatchesBlurOnRandomPlanes) {
  cv::RNG rng(20261202);
  for (int trial = 0; trial < 300; ++trial) {
    const int width = rng.uniform(1, 70), height = rng.uniform(1, 40);
    const int radius = rng.uniform(1, 9);  // 8 takes the cv::blur path
    const int channels = rng.uniform(0, 2) ? 3 : 1;
    cv::Mat src(height, width, CV_8UC(channels));
    rng.fill(src, cv::RNG::UNIFORM, 0, 256);
    expect_same_as_blur(src, radius);
  }
}

TEST(DriftBoxMean, MatchesBlurOnWorkingFrameAndExtremes) {
  cv::RNG rng(7);
  cv::Mat bgr(288, 512, CV_8UC3), gray(288, 512, CV_8UC1);
  rng.fill(bgr, cv::RNG::UNIFORM, 0, 256);
  rng.fill(gray, cv::RNG::UNIFORM, 0, 256);
  for (int radius = 1; radius <= 7; ++radius) {
    expect_same_as_blur(bgr, radius);
    expect_same_as_blur(gray, radius);
  }
  // All-white windows reach the largest sums (255 * 15^2 at radius 7).
  expect_same_as_blur(cv::Mat(40, 50, CV_8UC3, cv::Scalar::all(255)), 7);
  expect_same_as_blur(cv::Mat(1, 1, CV_8UC1, cv::Scalar(255)), 7);
}

}  // namespace
}  // namespace framelint::drift
