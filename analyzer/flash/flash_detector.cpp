#include "analyzer/flash/flash_detector.h"

#include <algorithm>
#include <cmath>

#include <opencv2/imgproc.hpp>

#include "analyzer/flash/area_rule.h"

namespace framelint::flash {
namespace {

const SwingRule kGeneralRule{kGeneralMinChange, false, kGeneralDarkerBelow, false};
const SwingRule kRedRule{kRedMinChange, true, 2.0f * kRedScale, true};

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
  init(general_, kGeneralRule);
  init(red_, kRedRule);
}

void FlashDetector::init(Kind& k, const SwingRule& rule) {
  k.rule = rule;
  k.trackers.resize(grid_.area());
  k.direction = cv::Mat::zeros(grid_, CV_8SC1);
  k.previous_direction = cv::Mat::zeros(grid_, CV_8SC1);
  k.previous_credited = cv::Mat::zeros(grid_, CV_8UC1);
  k.transitions = cv::Mat::zeros(grid_, CV_32SC1);
}

void FlashDetector::push(Kind& k, Stamped&& s) {
  if (s.cells.empty()) return;
  int* counts = k.transitions.ptr<int>();
  for (int i : s.cells) ++counts[i];
  k.total += static_cast<long>(s.cells.size());
  k.window.push_back(std::move(s));
}

void FlashDetector::expire(Kind& k, double t_s) {
  int* counts = k.transitions.ptr<int>();
  while (!k.window.empty() && k.window.front().t_s <= t_s - kWindow_s + kTimeMargin_s) {
    for (int i : k.window.front().cells) --counts[i];
    k.total -= static_cast<long>(k.window.front().cells.size());
    k.window.pop_front();
  }
}

// "The combined area of flashes occurring concurrently": a transition counts
// only when, in some 10-degree field that contains it, the cells changing
// the same way at the same time (in this frame, or in this frame and the
// one before, so a modulation whose cells cross the threshold a frame apart
// still counts as one event) outnumber those changing the other way by more than 25% of the
// field. A camera panning over texture moves every cell, but as many up as
// down at any moment: no transition of it counts.
// A transition of the previous frame that was not credited then may be now
// (stamped with its own time).
void FlashDetector::credit_concurrent(Kind& k, double t_s) {
  Stamped now{t_s, {}}, late{previous_t_s_, {}};
  cv::Mat credited = cv::Mat::zeros(grid_, CV_8UC1);
  const cv::Mat up = (k.direction == 1) / 255, down = (k.direction == -1) / 255;
  const cv::Mat up2 = up | ((k.previous_direction == 1) / 255);
  const cv::Mat down2 = down | ((k.previous_direction == -1) / 255);
  for (int dir : {1, -1}) {
    // This frame alone (an every-frame alternation goes up and down on
    // consecutive frames) or with the one before.
    const cv::Mat dense =
        dir == 1 ? cells_in_dense_fields(up, down, field_) | cells_in_dense_fields(up2, down2, field_)
                 : cells_in_dense_fields(down, up, field_) | cells_in_dense_fields(down2, up2, field_);
    const int8_t* cur = k.direction.ptr<int8_t>();
    const int8_t* prev = k.previous_direction.ptr<int8_t>();
    const uint8_t* in = dense.ptr<uint8_t>();
    uint8_t* was = k.previous_credited.ptr<uint8_t>();
    uint8_t* is = credited.ptr<uint8_t>();
    for (int i = 0; i < grid_.area(); ++i) {
      if (!in[i]) continue;
      if (cur[i] == dir) now.cells.push_back(i), is[i] = 1;
      if (prev[i] == dir && !was[i] && has_previous_) late.cells.push_back(i), was[i] = 1;
    }
  }
  push(k, std::move(late));
  push(k, std::move(now));
  k.previous_credited = credited;
  std::swap(k.previous_direction, k.direction);
}

void FlashDetector::measure(const Kind& k, int& flashes, cv::Rect2d& where) {
  if (k.total < least_total_for_hazard_check(field_)) return;
  flash_counts_.create(grid_, CV_32SC1);
  const int* in = k.transitions.ptr<int>();
  int* counts = flash_counts_.ptr<int>();
  for (int i = 0; i < grid_.area(); ++i) counts[i] = in[i] / 2;  // two transitions per flash
  const AreaResult r = max_flashes_over_area(flash_counts_, field_);
  flashes = r.flashes;
  where = as_fractions(r.field, grid_);
}

FlashFrame FlashDetector::add_frame(double t_s, const cv::Mat& luminance, const cv::Mat& linear_bgr) {
  cv::resize(luminance, luminance_cells_, grid_, 0, 0, cv::INTER_AREA);
  cv::resize(linear_bgr, colour_cells_, grid_, 0, 0, cv::INTER_AREA);
  for (int y = 0; y < grid_.height; ++y) {
    const float* lum = luminance_cells_.ptr<float>(y);
    const cv::Vec3f* bgr = colour_cells_.ptr<cv::Vec3f>(y);
    int8_t* general = general_.direction.ptr<int8_t>(y);
    int8_t* red = red_.direction.ptr<int8_t>(y);
    for (int x = 0; x < grid_.width; ++x) {
      const int i = y * grid_.width + x;
      general[x] = static_cast<int8_t>(general_.trackers[i].update({lum[x], false}, general_.rule));
      red[x] = static_cast<int8_t>(
          red_.trackers[i].update(red_sample(bgr[x][2], bgr[x][1], bgr[x][0]), red_.rule));
    }
  }
  FlashFrame out;
  out.t_s = t_s;
  for (Kind* k : {&general_, &red_}) {
    credit_concurrent(*k, t_s);
    expire(*k, t_s);
  }
  measure(general_, out.general_flashes, out.general_field);
  measure(red_, out.red_flashes, out.red_field);
  previous_t_s_ = t_s;
  has_previous_ = true;
  return out;
}

}  // namespace framelint::flash
