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

namespace {

// A decoded frame for the filter: its gray plane decides, its BGR plane is
// kept with it. Pictures differ by their noise seed (uniform noise,
// standard deviation ~74 levels: textured); a repeat is the same seed again.
CadenceFilter::Frame noise_frame(int64_t index, uint64_t seed) {
  auto f = std::make_shared<FramePlanes>();
  f->index = index;
  f->t_s = static_cast<double>(index) / 24.0;
  f->gray.create(64, 64, CV_8UC1);
  f->bgr.create(64, 64, CV_8UC3);
  cv::RNG rng(seed);
  rng.fill(f->gray, cv::RNG::UNIFORM, 0, 256);
  rng.fill(f->bgr, cv::RNG::UNIFORM, 0, 256);
  return f;
}

std::vector<int64_t> indices(const std::vector<HeldFrame>& frames) {
  std::vector<int64_t> out;
  for (const auto& f : frames) out.push_back(f.index());
  return out;
}

}  // namespace

// Frames pass on as they come until the first repeat: a new picture is
// analysed whatever the cadence turns out to be, so only a repeat's fate
// (and the frames after it, to keep the order) waits for the decision.
TEST(CadenceStream, NewPicturesPassAtOnceUntilTheFirstRepeat) {
  CadenceFilter filter;
  std::vector<HeldFrame> ready;
  for (int64_t i = 0; i < 5; ++i) {
    filter.push(noise_frame(i, 100 + i), ready);
    ASSERT_EQ(ready.size(), 1u) << "frame " << i << " was held back";
    EXPECT_EQ(ready.front().index(), i);
    ready.clear();
  }
  filter.push(noise_frame(5, 104), ready);  // repeats frame 4
  filter.push(noise_frame(6, 106), ready);  // new, but after a held repeat
  EXPECT_TRUE(ready.empty());
  filter.finish(ready);
  // One repeat in six pictures is no cadence (fewer than 3 repeated): the
  // two held frames follow the five passed, and all seven are analysed in
  // order with their own numbers.
  EXPECT_EQ(indices(ready), (std::vector<int64_t>{5, 6}));
  EXPECT_EQ(filter.source_frames(), (std::vector<int64_t>{0, 1, 2, 3, 4, 5, 6}));
}

// 8 fps content stored at 24 fps: each picture 3 times (decoded frames 0,
// 1, 2 one picture, 3, 4, 5 the next, ...; worked by hand, the pattern
// FFmpeg's fps filter writes, tests/reference/cadence_reference_test.cpp).
// The first picture passes at once; from its first repeat on everything
// waits for the decision at the 30th frame, which drops the repeats.
TEST(CadenceStream, StoredThreeTimesIsDecidedAtTheLookahead) {
  CadenceFilter filter;
  std::vector<HeldFrame> ready;
  std::vector<int64_t> handed_on_after;  // frames out after each push
  for (int64_t i = 0; i < 36; ++i) {
    filter.push(noise_frame(i, 200 + static_cast<uint64_t>(i / 3)), ready);
    handed_on_after.push_back(static_cast<int64_t>(ready.size()));
  }
  EXPECT_EQ(handed_on_after[0], 1);
  EXPECT_EQ(handed_on_after[28], 1);   // held since frame 1
  EXPECT_EQ(handed_on_after[29], 10);  // decided: pictures 0..9 (frames 0, 3, ..., 27)
  filter.finish(ready);
  ASSERT_EQ(ready.size(), 12u);
  EXPECT_EQ(indices(ready), (std::vector<int64_t>{0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11}));
  const std::vector<int64_t> expected_sources{0, 3, 6, 9, 12, 15, 18, 21, 24, 27, 30, 33};
  EXPECT_EQ(filter.source_frames(), expected_sources);
  const auto cadence = filter.cadence(36 / 24.0);
  ASSERT_TRUE(cadence);
  EXPECT_EQ(cadence->usual_repeats, 2);
  EXPECT_EQ(cadence->pictures, 12);
}

// While the cadence is decided, a stored repeat is held as the bytes where
// it differs from the picture it repeats: for the 8 -> 24 fps pattern above
// the filter holds frames 1..29 (frame 0 passed), of which only the 9 new
// pictures (frames 3, 6, ..., 27) keep their planes; the 20 exact repeats
// keep nothing. Counted by hand; holding every frame whole was 29 frames.
TEST(CadenceStream, RepeatsAreHeldAsTheirDifference) {
  CadenceFilter filter;
  std::vector<HeldFrame> ready;
  for (int64_t i = 0; i < 36; ++i)
    filter.push(noise_frame(i, 300 + static_cast<uint64_t>(i / 3)), ready);
  filter.finish(ready);
  const size_t frame_bytes = 64 * 64 * 3 + 64 * 64;  // BGR and gray
  EXPECT_EQ(filter.peak_held_full(), 9u);
  EXPECT_EQ(filter.peak_held_bytes(), 9 * frame_bytes);
}

// A held repeat that is not left out (no cadence) is rebuilt byte for byte:
// here a near repeat (3 gray bytes and 2 BGR bytes changed, still the same
// picture by same_picture's cell test) of a frame passed on at once.
TEST(CadenceStream, AHeldRepeatIsRebuiltExactly) {
  CadenceFilter filter;
  std::vector<HeldFrame> ready;
  for (int64_t i = 0; i < 5; ++i) filter.push(noise_frame(i, 400 + i), ready);
  ready.clear();
  CadenceFilter::Frame repeat = noise_frame(5, 404);
  repeat->gray.at<uint8_t>(0, 0) ^= 1;
  repeat->gray.at<uint8_t>(40, 17) ^= 4;
  repeat->gray.at<uint8_t>(63, 63) ^= 2;
  repeat->bgr.at<cv::Vec3b>(10, 20)[1] ^= 8;
  repeat->bgr.at<cv::Vec3b>(63, 0)[2] ^= 1;
  const cv::Mat gray = repeat->gray.clone(), bgr = repeat->bgr.clone();
  filter.push(repeat, ready);
  repeat.reset();
  EXPECT_EQ(filter.peak_held_full(), 0u);
  EXPECT_EQ(filter.peak_held_bytes(), 5 * (sizeof(uint32_t) + 1));  // offset and value per byte
  filter.finish(ready);
  ASSERT_EQ(ready.size(), 1u);
  // The spare frame's old pixels must not show through.
  auto planes = ready.front().take([] {
    auto spare = std::make_shared<FramePlanes>();
    spare->gray = cv::Mat(64, 64, CV_8UC1, cv::Scalar(7));
    spare->bgr = cv::Mat(64, 64, CV_8UC3, cv::Scalar(1, 2, 3));
    return spare;
  });
  EXPECT_EQ(planes->index, 5);
  EXPECT_DOUBLE_EQ(planes->t_s, 5 / 24.0);
  EXPECT_EQ(cv::norm(planes->gray, gray, cv::NORM_INF), 0);
  EXPECT_EQ(cv::norm(planes->bgr, bgr, cv::NORM_INF), 0);
}

// Two different pictures differ almost everywhere: no difference is kept
// (it would be larger than the plane), the plane is held whole.
TEST(PlaneDifference, ADifferentPictureIsKeptWhole) {
  const auto a = noise_frame(0, 1), b = noise_frame(1, 2);
  PlaneDifference d;
  EXPECT_FALSE(sparse_difference(b->gray, a->gray, d));
  EXPECT_TRUE(sparse_difference(a->gray, a->gray, d));
  EXPECT_EQ(d.bytes(), 0u);
  const HeldFrame held = HeldFrame::repeat_of(b, a);
  EXPECT_TRUE(held.in_full());
}
