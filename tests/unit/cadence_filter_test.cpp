// Cadence patterns (analyzer/pipeline/cadence_filter.h): which runs of
// stored repeats are a clip's habit and which are holds. The counts are the
// patterns frame-rate conversion produces, worked by hand: 8 -> 24 fps
// stores each picture 3 times; 24 -> 30 fps repeats one picture in four.
#include <gtest/gtest.h>

#include "analyzer/pipeline/cadence_filter.h"

using namespace clipwarden;

TEST(CadencePattern, EveryPictureThreeTimes) {
  const auto found = usual_repeats(std::vector<int>(16, 2));
  ASSERT_TRUE(found);
  EXPECT_EQ(found->first, 2);
  EXPECT_DOUBLE_EQ(found->second, 1.0);
}

TEST(CadencePattern, PulldownOneInFour) {
  std::vector<int> repeats;
  for (int i = 0; i < 24; ++i) repeats.push_back(i % 4 == 3 ? 1 : 0);
  const auto found = usual_repeats(repeats);
  ASSERT_TRUE(found);
  EXPECT_EQ(found->first, 1);
  EXPECT_DOUBLE_EQ(found->second, 0.25);
}

TEST(CadencePattern, OneLongHoldIsNotTheCadence) {
  std::vector<int> repeats(16, 2);
  repeats[7] = 20;
  EXPECT_EQ(usual_repeats(repeats)->first, 2);
}

TEST(CadencePattern, OpeningStillsAreNoCadence) {
  std::vector<int> repeats(40, 0);
  repeats[0] = 5;
  repeats[1] = 1;
  EXPECT_FALSE(usual_repeats(repeats));
  EXPECT_FALSE(usual_repeats({}));
  EXPECT_FALSE(usual_repeats({3}));
}

#include "analyzer/metrics/image_error.h"

// A still frame with one small thing moving: a 20x20 patch 60 levels
// brighter in a 512x288 frame changes the mean by 400 * 60 / 147456 = 0.16
// levels (0.00064 of the range, under the 0.001 freeze floor), but its
// 32x32 cell by 400 * 60 / 1024 = 23 levels: not the same picture. Noise of
// one level over a band of 20 rows stays the same picture (mean 0.00027).
TEST(SamePicture, ASmallMovingThingIsNotAFrozenPicture) {
  cv::Mat a(288, 512, CV_8UC1, cv::Scalar(100));
  cv::Mat b = a.clone();
  EXPECT_TRUE(same_picture(a, b));
  b(cv::Rect(200, 100, 20, 20)) += cv::Scalar(60);
  EXPECT_LE(mean_absolute_difference(a, b), 0.001);
  EXPECT_FALSE(same_picture(a, b));
  cv::Mat c = a.clone();
  c(cv::Rect(0, 0, 512, 20)) += cv::Scalar(1);  // a faint band: 20 of 288 rows one level up
  EXPECT_TRUE(same_picture(a, c));
}
