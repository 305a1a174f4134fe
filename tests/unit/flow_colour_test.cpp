// The Middlebury flow colour coding (Baker, Scharstein, Lewis, Roth, Black &
// Szeliski, "A Database and Evaluation Methodology for Optical Flow", IJCV
// 92(1), 2011). The paper gives the colour key and the wheel's segment
// lengths RY 15, YG 6, GC 4, CB 11, BM 13, MR 6; the expected colours below
// are derived by hand from that construction (each segment ramps one channel
// by floor(255 i / n); direction = angle of the reversed vector, mapped
// linearly onto wheel positions 0..54; saturation = length / max length).
// Recalled from memory, not from the paper's text: the key shows red for
// flow to the right, yellow for flow down, cyan-blue for flow to the left,
// violet-blue for flow up, and white at its centre.
#include <gtest/gtest.h>

#include <cmath>

#include "analyzer/inspect/flow_colour.h"

using namespace clipwarden;

namespace {
::testing::AssertionResult same(Rgb8 got, Rgb8 want) {
  if (got == want) return ::testing::AssertionSuccess();
  return ::testing::AssertionFailure()
         << "got (" << int(got.r) << "," << int(got.g) << "," << int(got.b) << ") want ("
         << int(want.r) << "," << int(want.g) << "," << int(want.b) << ")";
}
}  // namespace

TEST(FlowColour, WheelHasThePublishedSegments) {
  const auto& w = flow_colour_wheel();
  ASSERT_EQ(w.size(), 15u + 6 + 4 + 11 + 13 + 6);
  // Each segment starts on a primary or secondary colour.
  EXPECT_TRUE(same(w[0], {255, 0, 0}));     // red
  EXPECT_TRUE(same(w[15], {255, 255, 0}));  // yellow, after RY = 15
  EXPECT_TRUE(same(w[21], {0, 255, 0}));    // green, after YG = 6
  EXPECT_TRUE(same(w[25], {0, 255, 255}));  // cyan, after GC = 4
  EXPECT_TRUE(same(w[36], {0, 0, 255}));    // blue, after CB = 11
  EXPECT_TRUE(same(w[49], {255, 0, 255}));  // magenta, after BM = 13
  // Inside a segment one channel ramps by floor(255 i / n).
  EXPECT_TRUE(same(w[1], {255, 17, 0}));   // RY i=1: 255/15 = 17
  EXPECT_TRUE(same(w[54], {255, 0, 43}));  // MR i=5: 255 - floor(1275/6) = 255 - 212
}

TEST(FlowColour, UnitVectorsAtTheFourAxes) {
  // Right (0 deg): reversed vector points left, angle +-pi -> position 0: red.
  EXPECT_TRUE(same(flow_colour(1, 0), {255, 0, 0}));
  EXPECT_TRUE(same(flow_colour(1, -0.0), {255, 0, 0}));  // the sign of zero must not matter
  // Down (90 deg, image y grows downwards): angle -pi/2 -> position 13.5,
  // halfway between RY 13 (255,221,0) and RY 14 (255,238,0).
  EXPECT_TRUE(same(flow_colour(0, 1), {255, 229, 0}));
  // Left (180 deg): angle 0 -> position 27 = CB i=2: (0, 255 - floor(510/11), 255).
  EXPECT_TRUE(same(flow_colour(-1, 0), {0, 209, 255}));
  // Up (270 deg): angle pi/2 -> position 40.5, between BM 4 (78,0,255) and BM 5 (98,0,255).
  EXPECT_TRUE(same(flow_colour(0, -1), {88, 0, 255}));
}

TEST(FlowColour, ZeroIsWhiteAndLengthSetsSaturation) {
  EXPECT_TRUE(same(flow_colour(0, 0), {255, 255, 255}));
  // Half length: each channel moves halfway from white: 1 - 0.5 (1 - c).
  EXPECT_TRUE(same(flow_colour(0.5, 0), {255, 127, 127}));
  // Beyond the normalising length the hue darkens to 75 %.
  EXPECT_TRUE(same(flow_colour(2, 0), {191, 0, 0}));
  EXPECT_TRUE(same(flow_colour(NAN, 0), {0, 0, 0}));
}

TEST(FlowColour, FieldIsNormalisedByItsLargestVector) {
  cv::Mat flow(1, 3, CV_32FC2);
  flow.at<cv::Vec2f>(0, 0) = {4, 0};
  flow.at<cv::Vec2f>(0, 1) = {2, 0};
  flow.at<cv::Vec2f>(0, 2) = {0, 0};
  double max_px = 0;
  const cv::Mat bgr = flow_to_bgr(flow, 0, &max_px);
  EXPECT_DOUBLE_EQ(max_px, 4);
  EXPECT_EQ(bgr.at<cv::Vec3b>(0, 0), cv::Vec3b(0, 0, 255));
  EXPECT_EQ(bgr.at<cv::Vec3b>(0, 1), cv::Vec3b(127, 127, 255));
  EXPECT_EQ(bgr.at<cv::Vec3b>(0, 2), cv::Vec3b(255, 255, 255));
  // An all-zero field is white, not a division by zero.
  const cv::Mat still = flow_to_bgr(cv::Mat::zeros(2, 2, CV_32FC2));
  EXPECT_EQ(still.at<cv::Vec3b>(1, 1), cv::Vec3b(255, 255, 255));
}

TEST(FlowColour, WheelImageCentreIsWhiteAndRimIsSaturated) {
  const cv::Mat key = flow_colour_wheel_image(101);
  ASSERT_EQ(key.size(), cv::Size(101, 101));
  // Right of centre on the rim: red (BGR).
  const cv::Vec3b rim = key.at<cv::Vec3b>(50 + 20, 50 + 47);  // below the axis line, near the rim
  EXPECT_GT(rim[2], 200);
  const cv::Vec3b near_centre = key.at<cv::Vec3b>(52, 52);
  EXPECT_GT(near_centre[0], 230);
  EXPECT_GT(near_centre[1], 230);
}
