// The cut metric counts its 8x8x8 colour histograms itself; checked here
// against OpenCV's cv::calcHist + cv::compareHist (Bhattacharyya), the form
// it replaces, on random and on flat frames: the value must be identical.
// The distance is the smaller of the plain one and the one after scaling the
// previous frame's channels to the current frame's means (a fade is not a
// cut), so the reference does that scaling with cv::mean and cv::multiply.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>

#include <opencv2/imgproc.hpp>

#include "analyzer/metrics/metric.h"

namespace clipwarden {
std::unique_ptr<Metric> make_cut_metric(const AnalysisSettings&);
}

using namespace clipwarden;

namespace {

cv::Mat opencv_histogram(const cv::Mat& bgr) {
  const int channels[] = {0, 1, 2}, bins[] = {8, 8, 8};
  const float range[] = {0, 256};
  const float* ranges[] = {range, range, range};
  cv::Mat hist;
  cv::calcHist(&bgr, 1, channels, cv::noArray(), hist, 3, bins, ranges);
  return hist;
}

double reference_cut(const cv::Mat& prev, const cv::Mat& cur, double valid_fraction) {
  const cv::Scalar mean_prev = cv::mean(prev), mean_cur = cv::mean(cur);
  cv::Scalar gain;
  for (int c = 0; c < 3; ++c) gain[c] = mean_prev[c] >= 1 ? mean_cur[c] / mean_prev[c] : 1.0;
  cv::Mat scaled;
  cv::multiply(prev, gain, scaled);
  const double d = std::min(
      cv::compareHist(opencv_histogram(prev), opencv_histogram(cur), cv::HISTCMP_BHATTACHARYYA),
      cv::compareHist(opencv_histogram(scaled), opencv_histogram(cur), cv::HISTCMP_BHATTACHARYYA));
  return std::sqrt(std::clamp(1.0 - valid_fraction, 0.0, 1.0) * std::clamp(d, 0.0, 1.0));
}

}  // namespace

TEST(CutHistogram, SameValueAsCalcHist) {
  auto metric = make_cut_metric(AnalysisSettings{});
  cv::RNG rng(3);
  for (const cv::Size size : {cv::Size(512, 288), cv::Size(33, 17), cv::Size(1, 1)}) {
    FramePlanes a, b;
    a.bgr.create(size, CV_8UC3);
    b.bgr.create(size, CV_8UC3);
    rng.fill(a.bgr, cv::RNG::UNIFORM, 0, 256);
    rng.fill(b.bgr, cv::RNG::NORMAL, 128, 40);
    FramePair pair;
    pair.prev = &a;
    pair.cur = &b;
    pair.valid_fraction = 0.25;
    double out = 0;
    metric->measure_pair(pair, std::span<double>(&out, 1));
    EXPECT_EQ(out, reference_cut(a.bgr, b.bgr, 0.25)) << size;
    // Flat frames of two colours: all counts in one bin each; with the
    // gains matched they are one colour (a flat recolouring reads as a gain
    // change), unless a channel is black in the first frame.
    a.bgr.setTo(cv::Scalar(10, 200, 90));
    b.bgr.setTo(cv::Scalar(250, 0, 31));
    metric->measure_pair(pair, std::span<double>(&out, 1));
    EXPECT_EQ(out, reference_cut(a.bgr, b.bgr, 0.25)) << size;
    a.bgr.setTo(cv::Scalar(0, 200, 90));
    metric->measure_pair(pair, std::span<double>(&out, 1));
    EXPECT_EQ(out, reference_cut(a.bgr, b.bgr, 0.25)) << size;
    EXPECT_GT(out, 0.5) << size;
  }
}
