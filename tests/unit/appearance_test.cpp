// The appearance metric on frames made in memory, against values worked out
// by hand from its definition (analyzer/metrics/appearance_metric.cpp):
// score = (change - the frame's median cell change) / (hold + 3), with
// change and hold mean absolute differences of the blurred picture in grey
// levels. Flat pictures keep the blur and the flow out of the arithmetic:
// a blurred constant is the same constant, whatever the flow.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>

#include <opencv2/imgproc.hpp>

#include "clipwarden/analysis.h"
#include "support/synthetic_source.h"

using namespace clipwarden;
using namespace clipwarden::fixtures;

namespace {

const cv::Size kFrame(512, 288);  // the working size: no scaling
// 5 x 5 cells of 32 px: the middle cell and its neighbours lie inside.
const cv::Rect kSquare(128, 64, 160, 160);
constexpr int64_t kFrames = 24;
constexpr double kFps = 8;  // spans of 2 and 4 pictures

double highest_appearance(FrameMaker make) {
  SyntheticSource source(kFrames, kFps, std::move(make));
  AnalysisSettings settings;
  settings.threads = 1;
  auto report = analyze_source(source, "synthetic", settings, Policy{});
  EXPECT_TRUE(report.ok()) << (report.ok() ? "" : report.error().message());
  if (!report.ok()) return NAN;
  const MetricSeries* s = report.value().find_series("appearance");
  EXPECT_NE(s, nullptr);
  double best = 0;
  if (s)
    for (double v : s->values)
      if (is_defined(v)) best = std::max(best, v);
  return best;
}

cv::Mat grey(int level) { return cv::Mat(kFrame, CV_8UC3, cv::Scalar::all(level)); }

}  // namespace

// A square 60 levels brighter than the background appears at frame 10 and
// stays: inside it, change = 60, the background was still before and the
// square stays after (hold = 0), most cells did not change (median 0), so
// the score is 60 / (0 + 3) = 20.
TEST(Appearance, ASquareThatAppearsAndStaysScoresItsContrastOverTheFloor) {
  const double best = highest_appearance([](int64_t i) {
    cv::Mat f = grey(128);
    if (i >= 10) f(kSquare).setTo(cv::Scalar::all(188));
    return f;
  });
  EXPECT_NEAR(best, 20.0, 0.5);
}

// The same square shown for one frame only: at frame 10, change = 60 but it
// is gone a frame later (hold = 60): 60 / 63 = 0.95 at most.
TEST(Appearance, ASquareThatComesAndGoesDoesNotStay) {
  const double best = highest_appearance([](int64_t i) {
    cv::Mat f = grey(128);
    if (i == 10) f(kSquare).setTo(cv::Scalar::all(188));
    return f;
  });
  EXPECT_LE(best, 60.0 / 63.0 + 0.05);
}

// The whole picture brightens by 60 levels and stays so: every cell changes
// alike, the median cell change is 60, no cell has a change of its own.
TEST(Appearance, AChangeOfTheWholePictureIsNoRegionsOwn) {
  const double best = highest_appearance([](int64_t i) { return grey(i >= 10 ? 188 : 128); });
  EXPECT_EQ(best, 0.0);
}
