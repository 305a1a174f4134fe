// The appearance metric on frames made in memory, against values worked out
// by hand from its definition (analyzer/metrics/appearance_metric.cpp):
// score = (change - the frame's median cell change) / (hold + 3), with
// change and hold mean absolute differences of the blurred picture in grey
// levels. Flat pictures keep the blur and the flow out of the arithmetic:
// a blurred constant is the same constant, whatever the flow.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <utility>

#include <opencv2/imgproc.hpp>

#include "clipwarden/analysis.h"
#include "support/synthetic_source.h"

using namespace clipwarden;
using namespace clipwarden::fixtures;

namespace {

const cv::Size kFrame(512, 288);  // the working size: no scaling
// 3 x 3 cells of 32 px: the middle cell lies inside, 32 px from the edges
// (the 2 px blur does not reach it). A larger square changes enough of a
// flat picture for `cut` to read a new shot (160 px: 0.43 against 0.4),
// and a window across a cut is not judged; this one reads 0.31.
const cv::Rect kSquare(192, 96, 96, 96);
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

// A square 120 levels brighter than the background appears at frame 10 and
// stays: inside it, change = 120, the background was still before and the
// square stays after (hold = 0), most cells did not change (median 0), so
// the score is 120 / (0 + 3) = 40. At 60 levels the change is below the
// stark change of 100 levels that counts at all: 0.
TEST(Appearance, ASquareThatAppearsAndStaysScoresItsContrastOverTheFloor) {
  for (const auto& [level, expected] : {std::pair{248, 40.0}, std::pair{188, 0.0}}) {
    const double best = highest_appearance([level = level](int64_t i) {
      cv::Mat f = grey(128);
      if (i >= 10) f(kSquare).setTo(cv::Scalar::all(level));
      return f;
    });
    EXPECT_NEAR(best, expected, 0.5) << level;
  }
}

// The same square shown for one frame only: at frame 10, change = 120 but
// it is gone a frame later (hold = 120): 120 / 123 = 0.98 at most.
TEST(Appearance, ASquareThatComesAndGoesDoesNotStay) {
  const double best = highest_appearance([](int64_t i) {
    cv::Mat f = grey(128);
    if (i == 10) f(kSquare).setTo(cv::Scalar::all(248));
    return f;
  });
  EXPECT_LE(best, 120.0 / 123.0 + 0.05);
}

// The whole picture brightens by 120 levels and stays so: every cell
// changes alike, the median cell change is 120, no cell has a change of
// its own.
TEST(Appearance, AChangeOfTheWholePictureIsNoRegionsOwn) {
  const double best = highest_appearance([](int64_t i) { return grey(i >= 10 ? 248 : 128); });
  EXPECT_EQ(best, 0.0);
}
