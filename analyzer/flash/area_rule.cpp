#include "analyzer/flash/area_rule.h"

#include <algorithm>
#include <cmath>

#include <opencv2/imgproc.hpp>

namespace clipwarden::flash {

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

cv::Mat cells_in_dense_fields(const cv::Mat& same_way01, const cv::Mat& other_way01,
                              cv::Size field) {
  const cv::Mat& mask01 = same_way01;
  cv::Mat out = cv::Mat::zeros(mask01.size(), CV_8UC1);
  field.width = std::min(field.width, mask01.cols);
  field.height = std::min(field.height, mask01.rows);
  const double limit = kAreaFraction * field.area();
  if (cv::countNonZero(mask01) <= limit) return out;
  cv::Mat sum, other;
  cv::integral(mask01, sum, CV_32S);
  cv::integral(other_way01, other, CV_32S);
  // Field positions (top-left corners) where the rule is met...
  const int px = mask01.cols - field.width + 1, py = mask01.rows - field.height + 1;
  cv::Mat dense = cv::Mat::zeros(py, px, CV_8UC1);
  const int w = field.width, h = field.height;
  for (int y = 0; y < py; ++y) {
    const int *top = sum.ptr<int>(y), *bottom = sum.ptr<int>(y + h);
    const int *otop = other.ptr<int>(y), *obottom = other.ptr<int>(y + h);
    uint8_t* d = dense.ptr<uint8_t>(y);
    for (int x = 0; x < px; ++x) {
      const int same = bottom[x + w] - bottom[x] - top[x + w] + top[x];
      const int opposite = obottom[x + w] - obottom[x] - otop[x + w] + otop[x];
      d[x] = same - opposite > limit;
    }
  }
  // ...and the cells those fields cover: a cell (cx, cy) is covered when a
  // dense corner lies in [cx - w + 1, cx] x [cy - h + 1, cy].
  cv::Mat corners;
  cv::integral(dense, corners, CV_32S);
  for (int y = 0; y < mask01.rows; ++y) {
    const int y0 = std::max(0, y - field.height + 1), y1 = std::min(py, y + 1);
    const uint8_t* m = mask01.ptr<uint8_t>(y);
    uint8_t* o = out.ptr<uint8_t>(y);
    if (y0 >= y1) continue;
    const int* top = corners.ptr<int>(y0);
    const int* bottom = corners.ptr<int>(y1);
    for (int x = 0; x < mask01.cols; ++x) {
      if (!m[x]) continue;
      const int x0 = std::max(0, x - field.width + 1), x1 = std::min(px, x + 1);
      if (x0 < x1 && bottom[x1] - bottom[x0] - top[x1] + top[x0] > 0) o[x] = 1;
    }
  }
  return out;
}

}  // namespace clipwarden::flash
