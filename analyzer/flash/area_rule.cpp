#include "analyzer/flash/area_rule.h"

#include <algorithm>
#include <cmath>

#include <opencv2/imgproc.hpp>

namespace framelint::flash {

cv::Size ten_degree_field(cv::Size grid) {
  const int w = static_cast<int>(std::lround(grid.width * kFieldWidth_px / kScreenWidth_px));
  const int h = static_cast<int>(std::lround(grid.height * kFieldHeight_px / kScreenHeight_px));
  return {std::clamp(w, 1, std::max(1, grid.width)), std::clamp(h, 1, std::max(1, grid.height))};
}

namespace {

// The field position with the most set cells (mask is 0/1), by an integral
// image: every position costs four look-ups.
int densest_field(const cv::Mat& mask01, cv::Size field, cv::Rect& where) {
  cv::Mat sum;
  cv::integral(mask01, sum, CV_32S);
  int best = -1;
  for (int y = 0; y + field.height <= mask01.rows; ++y) {
    const int* top = sum.ptr<int>(y);
    const int* bottom = sum.ptr<int>(y + field.height);
    for (int x = 0; x + field.width <= mask01.cols; ++x) {
      const int s = bottom[x + field.width] - bottom[x] - top[x + field.width] + top[x];
      if (s > best) {
        best = s;
        where = cv::Rect(x, y, field.width, field.height);
      }
    }
  }
  return best;
}

}  // namespace

AreaResult max_flashes_over_area(const cv::Mat& flash_counts, cv::Size field) {
  AreaResult result;
  if (flash_counts.empty()) return result;
  field.width = std::min(field.width, flash_counts.cols);
  field.height = std::min(field.height, flash_counts.rows);
  // "More than 25%": strictly more cells than this.
  const double limit = kAreaFraction * field.area();
  double max_count = 0;
  cv::minMaxLoc(flash_counts, nullptr, &max_count);
  cv::Mat mask;
  // The set of cells with >= n flashes shrinks as n grows, so the first n
  // that fails ends the search; a calm frame stops at the cheap count check.
  for (int n = 1; n <= static_cast<int>(max_count); ++n) {
    cv::compare(flash_counts, n, mask, cv::CMP_GE);  // 0 / 255
    if (cv::countNonZero(mask) <= limit) break;
    mask /= 255;
    cv::Rect where;
    if (densest_field(mask, field, where) <= limit) break;
    result.flashes = n;
    result.field = where;
  }
  return result;
}

}  // namespace framelint::flash
