// Flash screening checked against the WCAG 2.x definitions (Understanding
// SC 2.3.1 and the definition "general flash and red flash thresholds";
// relative luminance per the WCAG definition, computed here by
// support/detectors_planes). Throughout, "an alternation at f Hz" means f
// full dark-light-dark cycles per second: 2f transitions, f flashes.
#include <gtest/gtest.h>

#include <algorithm>
#include <functional>

#include <opencv2/imgproc.hpp>

#include "analyzer/flash/area_rule.h"
#include "analyzer/flash/flash_detector.h"
#include "support/detectors_planes.h"

using namespace clipwarden::flash;
using clipwarden::testing::linear_planes;
using clipwarden::testing::wcag_linear;
using clipwarden::testing::wcag_relative_luminance;

namespace {

const cv::Vec3b kBlack{0, 0, 0}, kWhite{255, 255, 255};

// Runs the detector over `seconds` of frames at `fps`; frame(i) gives frame i.
std::vector<FlashFrame> run(double fps, double seconds, cv::Size size,
                            const std::function<cv::Mat(int)>& frame, double threshold = 0.04045) {
  FlashDetector detector(size);
  std::vector<FlashFrame> out;
  const int n = static_cast<int>(std::lround(fps * seconds));
  for (int i = 0; i < n; ++i) {
    const auto planes = linear_planes(frame(i), threshold);
    out.push_back(detector.add_frame(i / fps, planes.luminance, planes.linear_bgr));
  }
  return out;
}

// A full-frame alternation between two colours: `half` frames each.
std::function<cv::Mat(int)> alternate(cv::Size size, cv::Vec3b a, cv::Vec3b b, int half) {
  return [=](int i) { return cv::Mat(size, CV_8UC3, (i / half) % 2 ? b : a); };
}

int max_general(const std::vector<FlashFrame>& f) {
  int m = 0;
  for (const auto& x : f) m = std::max(m, x.general_flashes);
  return m;
}
int max_red(const std::vector<FlashFrame>& f) {
  int m = 0;
  for (const auto& x : f) m = std::max(m, x.red_flashes);
  return m;
}
bool any_hazard(const std::vector<FlashFrame>& f) {
  return std::any_of(f.begin(), f.end(), [](const FlashFrame& x) { return x.hazard(); });
}

const cv::Size kSize{320, 240};  // 4:3 like the WCAG reference screen

}  // namespace

TEST(SwingTracker, ReportsAFallOnceTheDarkerStateIsBelowPointEight) {
  // WCAG: a change of >= 0.1 counts only "where the relative luminance of
  // the darker image is below 0.80".
  const SwingRule rule{0.1f, false, 0.8f, false};
  SwingTracker t;
  EXPECT_EQ(t.update({1.0f, false}, rule), Swing::none);
  EXPECT_EQ(t.update({0.85f, false}, rule), Swing::none);  // 0.15 but darker 0.85
  EXPECT_EQ(t.update({0.5f, false}, rule), Swing::down);   // same swing, now darker 0.5
  EXPECT_EQ(t.update({0.45f, false}, rule), Swing::none);  // still the same swing
  EXPECT_EQ(t.update({0.56f, false}, rule), Swing::up);    // 0.11 back up from the valley
}

TEST(SwingTracker, IgnoresSmallWigglesAndBrightOscillation) {
  const SwingRule rule{0.1f, false, 0.8f, false};
  SwingTracker small, bright;
  for (int i = 0; i < 40; ++i) {
    EXPECT_EQ(small.update({i % 2 ? 0.30f : 0.38f, false}, rule), Swing::none);
    EXPECT_EQ(bright.update({i % 2 ? 0.85f : 1.0f, false}, rule), Swing::none);
  }
}

TEST(FlashDetector, FullScreenBlackWhiteAtFiveHertzIsAHazard) {
  // 30 fps, 3 frames per state: 5 cycles/s = 10 transitions/s = 5 flashes in
  // every one-second window, over the whole screen: more than three.
  const auto f = run(30, 3, kSize, alternate(kSize, kBlack, kWhite, 3));
  EXPECT_EQ(max_general(f), 5);
  EXPECT_TRUE(any_hazard(f));
  EXPECT_FALSE(f[10].hazard());  // the first second has not yet seen 4 flashes
}

TEST(FlashDetector, FullScreenBlackWhiteAtTwoHertzIsNotAHazard) {
  // 24 fps, 6 frames per state: 2 cycles/s = 4 transitions = 2 flashes.
  const auto f = run(24, 4, kSize, alternate(kSize, kBlack, kWhite, 6));
  EXPECT_EQ(max_general(f), 2);
  EXPECT_FALSE(any_hazard(f));
}

TEST(FlashDetector, ThreeFlashesPerSecondIsAllowedFourIsNot) {
  // "no more than three general flashes ... within any one-second period":
  // 3 Hz at 30 fps (5 frames per state) gives exactly 6 transitions in
  // every window (t - 1 s, t]; 4 Hz at 24 fps (3 frames per state) gives 8.
  const auto three = run(30, 4, kSize, alternate(kSize, kBlack, kWhite, 5));
  EXPECT_EQ(max_general(three), 3);
  EXPECT_FALSE(any_hazard(three));
  const auto four = run(24, 4, kSize, alternate(kSize, kBlack, kWhite, 3));
  EXPECT_EQ(max_general(four), 4);
  EXPECT_TRUE(any_hazard(four));
}

TEST(FlashDetector, CountsByTimeSoFrameRatesAreJudgedAlike) {
  // 4 Hz as every-frame alternation at 8 fps and as 5 frames per state at
  // 40 fps: both 4 flashes per second.
  const auto slow = run(8, 4, kSize, alternate(kSize, kBlack, kWhite, 1));
  const auto fast = run(40, 4, kSize, alternate(kSize, kBlack, kWhite, 5));
  EXPECT_EQ(max_general(slow), 4);
  EXPECT_EQ(max_general(fast), 4);
  // 2 Hz at 60 fps (15 frames per state): 2 flashes, like 2 Hz anywhere.
  EXPECT_EQ(max_general(run(60, 3, kSize, alternate(kSize, kBlack, kWhite, 15))), 2);
}

TEST(FlashDetector, DimGreysChangingLessThanATenthDoNotFlash) {
  // sRGB codes 40 and 70: relative luminance 0.021 and 0.061, a change of
  // 0.04 (< 0.1), alternating at 4 Hz.
  const cv::Vec3b dark{40, 40, 40}, less_dark{70, 70, 70};
  ASSERT_LT(wcag_relative_luminance(less_dark, 0.04045) - wcag_relative_luminance(dark, 0.04045),
            0.1);
  const auto f = run(24, 3, kSize, alternate(kSize, dark, less_dark, 3));
  EXPECT_EQ(max_general(f), 0);
  EXPECT_EQ(max_red(f), 0);
}

TEST(FlashDetector, BrightChangesWithTheDarkerStateAbovePointEightDoNotFlash) {
  // Codes 235 and 255: luminance 0.83 and 1.0, change 0.17, darker 0.83.
  const cv::Vec3b bright{235, 235, 235};
  ASSERT_GE(wcag_relative_luminance(bright, 0.04045), 0.8);
  EXPECT_EQ(max_general(run(24, 3, kSize, alternate(kSize, bright, kWhite, 3))), 0);
}

TEST(FlashDetector, PatchSmallerThanTheAreaRuleIsNotAHazard) {
  // A 300x300 frame maps one pixel to one cell; the 10-degree field is then
  // 100x100 cells (341/1024 and 256/768 of the frame). A black/white patch
  // flashing at 6 Hz covering exactly 25% of a field is allowed ("no more
  // than ... 25%"); one row more is not.
  const cv::Size size{300, 300};
  ASSERT_EQ(ten_degree_field(size), cv::Size(100, 100));
  auto patch = [&](int w, int h) {
    return [=](int i) {
      cv::Mat m(size, CV_8UC3, cv::Scalar::all(0));
      if ((i / 2) % 2) m(cv::Rect(120, 100, w, h)).setTo(cv::Scalar::all(255));
      return m;
    };
  };
  const auto quarter = run(24, 3, size, patch(50, 50));
  EXPECT_EQ(max_general(quarter), 0);
  EXPECT_FALSE(any_hazard(quarter));
  const auto over = run(24, 3, size, patch(50, 51));
  EXPECT_EQ(max_general(over), 6);
  EXPECT_TRUE(any_hazard(over));
  // Where: the field that holds the patch.
  const cv::Rect2d where = over.back().general_field;
  EXPECT_LE(where.x, 120.0 / 300);
  EXPECT_GE(where.x + where.width, 170.0 / 300);
}

TEST(FlashDetector, SaturatedRedAlternationTriggersTheRedRule) {
  // Pure red (R/(R+G+B) = 1, (R-G-B)x320 = 320) against a grey of nearly the
  // same relative luminance (code 127: 0.212 vs red's 0.2126), at 5 Hz: no
  // general flash at all, but red transitions of 320 > 20.
  const cv::Vec3b red{0, 0, 255}, grey{127, 127, 127};
  ASSERT_LT(std::fabs(wcag_relative_luminance(red, 0.04045) - wcag_relative_luminance(grey, 0.04045)),
            0.01);
  const auto f = run(30, 3, kSize, alternate(kSize, grey, red, 3));
  EXPECT_EQ(max_general(f), 0);
  EXPECT_EQ(max_red(f), 5);
  EXPECT_TRUE(any_hazard(f));
}

TEST(FlashDetector, UnsaturatedPinkDoesNotTriggerTheRedRule) {
  // Pink (255,128,128): linear (1, 0.216, 0.216), R/(R+G+B) = 0.70 < 0.8, so
  // neither state is a saturated red although (R-G-B)x320 changes by ~180.
  const cv::Vec3b pink{128, 128, 255};
  const double r = wcag_linear(255, 0.04045), g = wcag_linear(128, 0.04045);
  ASSERT_LT(r / (r + 2 * g), 0.8);
  const auto f = run(30, 3, kSize, alternate(kSize, cv::Vec3b{150, 150, 150}, pink, 3));
  EXPECT_EQ(max_red(f), 0);
}

TEST(FlashDetector, RedSampleFollowsTheWorkingDefinition) {
  // Negative (R-G-B)x320 is set to zero; saturation is R/(R+G+B) >= 0.8.
  EXPECT_FLOAT_EQ(red_sample(1, 0, 0).value, 320);
  EXPECT_TRUE(red_sample(1, 0, 0).saturated);
  EXPECT_FLOAT_EQ(red_sample(0.2f, 0.5f, 0.1f).value, 0);
  EXPECT_FALSE(red_sample(0, 0, 0).saturated);
  EXPECT_TRUE(red_sample(0.8f, 0.1f, 0.1f).saturated);
  EXPECT_FALSE(red_sample(0.7f, 0.2f, 0.1f).saturated);
}

TEST(FlashDetector, BothLinearisationThresholdsGiveTheSameResultAtTheBoundary) {
  // WCAG quotes 0.03928, IEC 61966-2-1 uses 0.04045: no 8-bit code lies
  // between them (10/255 = 0.0392, 11/255 = 0.0431), so every code maps to
  // the same linear value...
  for (int c = 0; c < 256; ++c) EXPECT_EQ(wcag_linear(c, 0.03928), wcag_linear(c, 0.04045)) << c;
  // ...and flash decisions right at the 0.1 change from the boundary codes
  // agree: find the first grey whose change from code 10 (and 11) reaches 0.1.
  for (int low : {10, 11}) {
    int first = low;
    while (wcag_linear(first, 0.04045) - wcag_linear(low, 0.04045) < 0.1) ++first;
    for (int high : {first - 1, first}) {
      const cv::Vec3b a(low, low, low), b(high, high, high);
      const auto wcag = run(24, 2, kSize, alternate(kSize, a, b, 3), 0.03928);
      const auto iec = run(24, 2, kSize, alternate(kSize, a, b, 3), 0.04045);
      EXPECT_EQ(max_general(wcag), max_general(iec)) << low << " vs " << high;
      EXPECT_EQ(max_general(iec), high == first ? 4 : 0) << low << " vs " << high;
    }
  }
}

TEST(FlashDetector, SlowFadesAreNotFlashes) {
  // Black to white and back over 2 s each: one transition per fade.
  const auto f = run(30, 8, kSize, [&](int i) {
    const double phase = std::fmod(i / 30.0, 4.0);
    const int v = static_cast<int>(std::lround(255 * (phase < 2 ? phase / 2 : (4 - phase) / 2)));
    return cv::Mat(kSize, CV_8UC3, cv::Scalar::all(v));
  });
  EXPECT_EQ(max_general(f), 0);
}

TEST(FlashDetector, APanOverHighContrastTextureIsNotAFlash) {
  // Every cell of a panned black/white texture changes by far more than 0.1
  // several times a second, but never most of a field the same way at once:
  // no concurrent flashing area ("combined area of flashes occurring
  // concurrently").
  cv::Mat texture(240, 2000, CV_8UC3);
  cv::randu(texture, 0, 256);
  cv::resize(texture, texture, cv::Size(), 1, 1);
  cv::threshold(texture, texture, 127, 255, cv::THRESH_BINARY);
  cv::Mat wide;
  cv::resize(texture, wide, cv::Size(4000, 240), 0, 0, cv::INTER_NEAREST);  // 2 px wide stripes
  const auto f = run(30, 3, kSize, [&](int i) { return wide(cv::Rect(7 * i, 0, 320, 240)).clone(); });
  EXPECT_FALSE(any_hazard(f));
  EXPECT_LE(max_general(f), 1);
}
