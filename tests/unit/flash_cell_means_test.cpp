// The fused cell-mean kernel of the flash grid against its reference form,
// cv::resize(INTER_AREA) of the luminance plane and of the linear-light
// colour image (OpenCV is the outside source): bit-identical on random
// frames of the working sizes and of awkward ones.
#include <gtest/gtest.h>

#include <opencv2/imgproc.hpp>

#include "analyzer/color/relative_luminance.h"
#include "analyzer/flash/cell_means.h"
#include "analyzer/flash/flash_detector.h"

using namespace clipwarden;
using namespace clipwarden::flash;

namespace {

bool same_bits(const cv::Mat& a, const cv::Mat& b) {
  if (a.size() != b.size() || a.type() != b.type()) return false;
  for (int y = 0; y < a.rows; ++y)
    if (std::memcmp(a.ptr(y), b.ptr(y), a.cols * a.elemSize()) != 0) return false;
  return true;
}

void expect_identical(cv::Size frame, int seed) {
  cv::RNG rng(seed);
  cv::Mat bgr(frame, CV_8UC3);
  rng.fill(bgr, cv::RNG::UNIFORM, 0, 256);
  cv::Mat luminance;
  relative_luminance(bgr, luminance);
  const cv::Size grid = flash_grid(frame, kGridCellsPerAxis);

  const auto& table = srgb8_to_linear_table();
  cv::Mat linear;
  cv::LUT(bgr, cv::Mat(1, 256, CV_32FC1, const_cast<float*>(table.data())), linear);
  CellMeans reference, fused;
  cell_means_of_linear(luminance, linear, grid, reference);
  compute_cell_means(luminance, bgr, grid, fused);
  compute_cell_means(luminance, bgr, grid, fused);  // reused buffers and tables
  EXPECT_TRUE(same_bits(reference.luminance, fused.luminance)) << frame;
  EXPECT_TRUE(same_bits(reference.red, fused.red)) << frame;
  EXPECT_TRUE(same_bits(reference.green, fused.green)) << frame;
  EXPECT_TRUE(same_bits(reference.blue, fused.blue)) << frame;
}

}  // namespace

TEST(FlashCellMeans, MatchesAreaResizeAtWorkingSizes) {
  expect_identical({512, 288}, 1);  // 16:9, 300 x 288 cells
  expect_identical({512, 384}, 2);  // 4:3, both axes resampled
  expect_identical({288, 512}, 3);  // portrait
  expect_identical({1024, 576}, 4);
}

TEST(FlashCellMeans, MatchesAreaResizeAtAwkwardSizes) {
  expect_identical({200, 120}, 5);   // fewer pixels than cells: a copy
  expect_identical({601, 333}, 6);   // odd scales
  expect_identical({600, 600}, 7);   // whole scales: OpenCV's block-sum path
  expect_identical({600, 288}, 8);   // whole across, 1 down
  expect_identical({301, 1}, 9);
}
