#include "analyzer/flash/flash_detector.h"

#include <algorithm>
#include <cmath>

#include <opencv2/imgproc.hpp>

#include "analyzer/flash/area_rule.h"

namespace framelint::flash {
namespace {

constexpr SwingRule kGeneralRule{kGeneralMinChange, false, kGeneralDarkerBelow, false};
constexpr SwingRule kRedRule{kRedMinChange, true, 2.0f * kRedScale, true};

// Window edges: a transition exactly one second before t lies outside
// (t - 1 s, t]; timestamps carry rounding from time bases, hence the margin.
constexpr double kTimeMargin_s = 1e-6;

cv::Rect2d as_fractions(const cv::Rect& r, cv::Size grid) {
  if (r.empty()) return {};
  return {static_cast<double>(r.x) / grid.width, static_cast<double>(r.y) / grid.height,
          static_cast<double>(r.width) / grid.width, static_cast<double>(r.height) / grid.height};
}

// Cells whose transitions, two per flash, could cover more than the area
// rule's share of one field: below this total nothing needs measuring.
long least_total_for_hazard_check(cv::Size field) {
  return 2 * (static_cast<long>(std::floor(kAreaFraction * field.area())) + 1);
}

}  // namespace

SwingSample red_sample(float r, float g, float b) {
  const float sum = r + g + b;
  SwingSample s;
  s.value = std::max(0.0f, (r - g - b) * kRedScale);
  s.saturated = sum > 0 && r >= kRedSaturatedRatio * sum;
  return s;
}

FlashDetector::FlashDetector(cv::Size frame_size, int cells_per_axis) {
  grid_ = {std::clamp(frame_size.width, 1, cells_per_axis),
           std::clamp(frame_size.height, 1, cells_per_axis)};
  field_ = ten_degree_field(grid_);
  general_.resize(grid_.area());
  red_.resize(grid_.area());
  general_transitions_ = cv::Mat::zeros(grid_, CV_32SC1);
  red_transitions_ = cv::Mat::zeros(grid_, CV_32SC1);
}

void FlashDetector::expire(double t_s) {
  int* general = general_transitions_.ptr<int>();
  int* red = red_transitions_.ptr<int>();
  while (!window_.empty() && window_.front().t_s <= t_s - kWindow_s + kTimeMargin_s) {
    for (int i : window_.front().general_cells) --general[i];
    for (int i : window_.front().red_cells) --red[i];
    general_total_ -= static_cast<long>(window_.front().general_cells.size());
    red_total_ -= static_cast<long>(window_.front().red_cells.size());
    window_.pop_front();
  }
}

FlashFrame FlashDetector::add_frame(double t_s, const cv::Mat& luminance, const cv::Mat& linear_bgr) {
  expire(t_s);
  cv::resize(luminance, luminance_cells_, grid_, 0, 0, cv::INTER_AREA);
  cv::resize(linear_bgr, colour_cells_, grid_, 0, 0, cv::INTER_AREA);

  Stamped stamped;
  stamped.t_s = t_s;
  for (int y = 0; y < grid_.height; ++y) {
    const float* lum = luminance_cells_.ptr<float>(y);
    const cv::Vec3f* bgr = colour_cells_.ptr<cv::Vec3f>(y);
    for (int x = 0; x < grid_.width; ++x) {
      const int i = y * grid_.width + x;
      if (general_[i].update({lum[x], false}, kGeneralRule) != Swing::none)
        stamped.general_cells.push_back(i);
      if (red_[i].update(red_sample(bgr[x][2], bgr[x][1], bgr[x][0]), kRedRule) != Swing::none)
        stamped.red_cells.push_back(i);
    }
  }
  int* general = general_transitions_.ptr<int>();
  int* red = red_transitions_.ptr<int>();
  for (int i : stamped.general_cells) ++general[i];
  for (int i : stamped.red_cells) ++red[i];
  general_total_ += static_cast<long>(stamped.general_cells.size());
  red_total_ += static_cast<long>(stamped.red_cells.size());
  if (!stamped.general_cells.empty() || !stamped.red_cells.empty())
    window_.push_back(std::move(stamped));

  FlashFrame out;
  out.t_s = t_s;
  const long least = least_total_for_hazard_check(field_);
  auto measure = [&](const cv::Mat& transitions, long total, int& flashes, cv::Rect2d& where) {
    if (total < least) return;
    flash_counts_.create(grid_, CV_32SC1);
    const int* in = transitions.ptr<int>();
    int* counts = flash_counts_.ptr<int>();
    for (int i = 0; i < grid_.area(); ++i) counts[i] = in[i] / 2;  // two transitions per flash
    const AreaResult r = max_flashes_over_area(flash_counts_, field_);
    flashes = r.flashes;
    where = as_fractions(r.field, grid_);
  };
  measure(general_transitions_, general_total_, out.general_flashes, out.general_field);
  measure(red_transitions_, red_total_, out.red_flashes, out.red_field);
  return out;
}

}  // namespace framelint::flash
