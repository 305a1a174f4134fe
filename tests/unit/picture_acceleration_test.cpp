// The whole picture's acceleration from two flow fields (analyzer/metrics/
// picture_acceleration.h) on fields made by hand: a point's second
// difference is its forward flow plus its backward flow (Sundaram, Brox &
// Keutzer, ECCV 2010, point trajectories from forward and backward flow),
// and a frame displaced by d moves every point's by -2 d.
#include <gtest/gtest.h>

#include <cmath>
#include <random>

#include "analyzer/metrics/picture_acceleration.h"

namespace clipwarden {
namespace {

const cv::Size kFrame{320, 240};  // diagonal 400 px

cv::Mat uniform_flow(float dx, float dy) { return cv::Mat(kFrame, CV_32FC2, cv::Scalar(dx, dy)); }
cv::Mat all_valid() { return cv::Mat(kFrame, CV_8UC1, cv::Scalar(255)); }

TEST(PictureAcceleration, ADisplacedFrameReadsTwiceItsShiftOverTheDiagonal) {
  // A pan of 3 px per frame; frame t sits 8 px further right: it came from
  // 3 + 8 px to the left and leaves 3 - 8 px to the right.
  const FlowSamples in = sample_flow_grid(uniform_flow(-11, -1), all_valid());
  ASSERT_GT(in.at.size(), 500u);
  EXPECT_NEAR(picture_acceleration(in, uniform_flow(-5, 1), all_valid()), 2 * 8 / 400.0, 1e-6);
  // The steady pan alone: no acceleration.
  EXPECT_NEAR(picture_acceleration(sample_flow_grid(uniform_flow(-3, -1), all_valid()), uniform_flow(3, 1),
                                   all_valid()),
              0, 1e-6);
}

TEST(PictureAcceleration, SomethingAcceleratingOnItsOwnGivesNoReading) {
  // A still scene where the left third (a hand) reverses 20 px per frame:
  // most points agree on no acceleration, but the picture does not move as
  // one, so there is no reading.
  cv::Mat back = uniform_flow(0, 0), fwd = uniform_flow(0, 0);
  back(cv::Rect(0, 0, kFrame.width / 3, kFrame.height)).setTo(cv::Scalar(-10, 0));
  fwd(cv::Rect(0, 0, kFrame.width / 3, kFrame.height)).setTo(cv::Scalar(-10, 0));
  EXPECT_TRUE(std::isnan(picture_acceleration(sample_flow_grid(back, all_valid()), fwd, all_valid())));
  // A bird filling the middle 60% of the view jerks by 16 px; the rest
  // keeps still. Most points agree on the bird's jerk, but not four in five.
  back = uniform_flow(0, 0), fwd = uniform_flow(0, 0);
  const cv::Rect bird(32, 32, kFrame.width - 64, kFrame.height - 64);
  back(bird).setTo(cv::Scalar(-8, 0));
  fwd(bird).setTo(cv::Scalar(-8, 0));
  EXPECT_TRUE(std::isnan(picture_acceleration(sample_flow_grid(back, all_valid()), fwd, all_valid())));
  // Flat cells (no valid flow) say nothing: the displaced picture still
  // reads where two thirds of it is textured.
  cv::Mat textured = all_valid();
  textured(cv::Rect(0, 0, kFrame.width / 3, kFrame.height)).setTo(0);
  EXPECT_NEAR(picture_acceleration(sample_flow_grid(uniform_flow(-11, -1), textured), uniform_flow(-5, 1), textured),
              2 * 8 / 400.0, 1e-6);
}

TEST(PictureAcceleration, NoAgreementNoReading) {
  // Every point accelerates its own way (water, flames): undefined.
  std::mt19937 rng(7);
  std::uniform_real_distribution<float> u(-20, 20);
  cv::Mat back(kFrame, CV_32FC2), fwd(kFrame, CV_32FC2);
  for (int y = 0; y < kFrame.height; ++y)
    for (int x = 0; x < kFrame.width; ++x) {
      back.at<cv::Vec2f>(y, x) = {u(rng), u(rng)};
      fwd.at<cv::Vec2f>(y, x) = {u(rng), u(rng)};
    }
  EXPECT_TRUE(std::isnan(picture_acceleration(sample_flow_grid(back, all_valid()), fwd, all_valid())));
}

TEST(PictureAcceleration, FlowThatFailedItsCheckIsNotRead) {
  const cv::Mat none = cv::Mat::zeros(kFrame, CV_8UC1);
  EXPECT_TRUE(sample_flow_grid(uniform_flow(-11, 0), none).at.empty());
  const FlowSamples in = sample_flow_grid(uniform_flow(-11, 0), all_valid());
  EXPECT_TRUE(std::isnan(picture_acceleration(in, uniform_flow(-5, 0), none)));
  EXPECT_TRUE(std::isnan(picture_acceleration(in, cv::Mat(), all_valid())));
}

}  // namespace
}  // namespace clipwarden
