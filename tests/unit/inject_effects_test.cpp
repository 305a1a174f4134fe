// The picture operations defects are made of (analyzer/inject/
// frame_effects.*), on small synthetic frames. Outside sources named beside
// each check.
#include <gtest/gtest.h>

#include <cmath>

#include <opencv2/imgproc.hpp>

#include "analyzer/inject/frame_effects.h"
#include "support/inject_clips.h"

using namespace clipwarden;
using namespace clipwarden::inject;
using clipwarden::test::mean_relative_luminance;
using clipwarden::test::synthetic_frame;

TEST(FrameEffects, LinearGainScalesMeanRelativeLuminanceByTheGain) {
  // Relative luminance is linear in linear-light RGB (IEC 61966-2-1 decoding,
  // BT.709 weights), so scaling linear light by g scales Y by g; 8-bit
  // re-encoding leaves a rounding error well under 1%.
  const cv::Mat clean = synthetic_frame({64, 48}, 3);
  for (double gain : {0.85, 0.97, 1.03, 1.2}) {
    cv::Mat frame = clean.clone();
    scale_linear_light(frame, gain, whole_frame(frame.size()));
    EXPECT_NEAR(mean_relative_luminance(frame) / mean_relative_luminance(clean), gain, 0.006) << gain;
  }
}

TEST(FrameEffects, FeatheredEllipseIsOneInsideZeroOutsideAndClipped) {
  const SoftMask m = feathered_ellipse({100, 80}, cv::Rect2d(20, 10, 40, 30));
  EXPECT_EQ(m.roi, cv::Rect(20, 10, 40, 30));
  EXPECT_FLOAT_EQ(m.weight.at<float>(15, 20), 1.0f);  // centre
  EXPECT_FLOAT_EQ(m.weight.at<float>(0, 0), 0.0f);    // corner of the box
  const SoftMask clipped = feathered_ellipse({100, 80}, cv::Rect2d(-20, 70, 40, 30));
  EXPECT_EQ(clipped.roi, cv::Rect(0, 70, 20, 10));
  EXPECT_TRUE(feathered_ellipse({100, 80}, cv::Rect2d(200, 10, 40, 30)).roi.empty());
}

TEST(FrameEffects, MaskedEditsLeaveTheOutsideUntouched) {
  const cv::Mat clean = synthetic_frame({80, 60}, 0);
  const SoftMask mask = feathered_ellipse(clean.size(), cv::Rect2d(30, 20, 24, 18));
  cv::Mat outside(clean.size(), CV_8UC1, cv::Scalar(255));
  outside(mask.roi).setTo(0);
  cv::RNG rng(7);
  std::vector<cv::Mat> edited(5, clean);
  for (auto& e : edited) e = clean.clone();
  scale_linear_light(edited[0], 1.5, mask);
  add_noise(edited[1], smooth_noise_field(mask.roi.size(), 2, rng), 20, mask);
  shift_chroma(edited[2], {15, -10}, mask);
  scale_about(edited[3], {42, 29}, 1.4, mask);
  fade_into_surroundings(edited[4], mask, 1.0);
  for (size_t i = 0; i < edited.size(); ++i) {
    cv::Mat diff;
    cv::absdiff(edited[i], clean, diff);
    cv::cvtColor(diff, diff, cv::COLOR_BGR2GRAY);
    EXPECT_EQ(cv::countNonZero(diff & outside), 0) << "effect " << i << " leaked outside its region";
    EXPECT_GT(cv::countNonZero(diff), 50) << "effect " << i << " changed nothing";
  }
}

TEST(FrameEffects, NoiseFieldsHaveUnitSpreadAndAreIndependentFrameToFrame) {
  cv::RNG rng(11);
  const cv::Mat a = smooth_noise_field({64, 64}, 3, rng), b = smooth_noise_field({64, 64}, 3, rng);
  cv::Scalar mean, stddev;
  cv::meanStdDev(a, mean, stddev);
  EXPECT_NEAR(mean[0], 0, 1e-4);
  EXPECT_NEAR(stddev[0], 1, 1e-4);
  // Pearson correlation of two draws: near zero for independent fields.
  const double correlation = a.dot(b) / (a.total());
  EXPECT_LT(std::fabs(correlation), 0.2);
  cv::RNG same(11);
  EXPECT_TRUE(cv::norm(a, smooth_noise_field({64, 64}, 3, same), cv::NORM_INF) == 0) << "seeded draws repeat";
}

TEST(FrameEffects, DisplaceMovesTheContent) {
  const cv::Mat clean = synthetic_frame({64, 48}, 0);
  cv::Mat moved = clean.clone();
  displace(moved, {5, -3});
  // moved(x, y) = clean(x - 5, y + 3) away from the replicated border.
  EXPECT_TRUE(clipwarden::test::same_pixels(moved(cv::Rect(5, 0, 59, 45)), clean(cv::Rect(0, 3, 59, 45))));
}

TEST(FrameEffects, FadeReplacesTheRegionWithItsSurroundings) {
  cv::Mat frame(60, 80, CV_8UC3, cv::Scalar(40, 120, 200));
  cv::rectangle(frame, cv::Rect(34, 24, 12, 12), cv::Scalar(250, 250, 250), cv::FILLED);
  fade_into_surroundings(frame, feathered_ellipse(frame.size(), cv::Rect2d(28, 18, 24, 24), 0.2), 1.0);
  const cv::Vec3b centre = frame.at<cv::Vec3b>(30, 40);
  EXPECT_NEAR(centre[0], 40, 2);
  EXPECT_NEAR(centre[1], 120, 2);
  EXPECT_NEAR(centre[2], 200, 2);
}

TEST(FrameEffects, ChromaShiftReachesTheTargetDifference) {
  const cv::Vec3d lab(55, 20, -12);
  const cv::Vec2d direction(0.6, 0.8);
  for (double target : {2.0, 8.0, 20.0}) {
    const double m = chroma_shift_for_de(lab, direction, target);
    EXPECT_NEAR(clipwarden::color::ciede2000(
                    as_lab(lab), {lab[0], lab[1] + m * direction[0], lab[2] + m * direction[1]}),
                target, 1e-6);
  }
}
