#include "analyzer/flash/flash_detector.h"

#include <algorithm>
#include <cmath>
#include <cstring>

#include <opencv2/imgproc.hpp>

#include "analyzer/flash/area_rule.h"

namespace clipwarden::flash {
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
  grid_ = flash_grid(frame_size, cells_per_axis);
  field_ = ten_degree_field(grid_);
  init(general_, kGeneralRule);
  init(red_, kRedRule);
}

void FlashDetector::init(Kind& k, const SwingRule& rule) {
  k.rule = rule;
  k.trackers.resize(grid_.area());
  k.quiet_lo.assign(grid_.area(), 1.0f);  // empty ranges: no sample yet
  k.quiet_hi.assign(grid_.area(), 0.0f);
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
  // A field position is dense only where more than kAreaFraction of the
  // field changed one way in this frame or the two last ones together
  // (cells_in_dense_fields). With fewer such cells in the whole grid none
  // is, nothing is credited: the common calm frame ends here, with what the
  // full pass below leaves (no credits, the directions moved on).
  const double limit = kAreaFraction * field_.area();
  const int ups = k.ups + k.previous_ups, downs = k.downs + k.previous_downs;
  k.previous_ups = k.ups, k.previous_downs = k.downs;
  if (ups <= limit && downs <= limit) {
    k.previous_credited.setTo(0);
    std::swap(k.previous_direction, k.direction);
    return;
  }
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
  cell_means_of_linear(luminance, linear_bgr, grid_, cells_);
  return add_cells(t_s, cells_);
}

namespace {

inline int32_t screen(const float* __restrict lum, const float* __restrict r,
                      const float* __restrict g, const float* __restrict b,
                      const float* __restrict glo, const float* __restrict ghi,
                      const float* __restrict rlo, const float* __restrict rhi, int x) {
  const float v = lum[x];
  const float t = (r[x] - g[x] - b[x]) * kRedScale;
  const float red_value = t > 0.0f ? t : 0.0f;  // max(0, t) as red_sample
  const int general_quiet = (v >= glo[x]) & (v <= ghi[x]);
  const int red_quiet = (red_value >= rlo[x]) & (red_value <= rhi[x]);
  return (general_quiet ^ 1) | ((red_quiet ^ 1) << 1);
}

// flag[x]: bit 0 if the luminance sample leaves the general rule's quiet
// range, bit 1 if the red quantity leaves the red rule's. Bitwise, not &&,
// and in blocks of a fixed count: GCC's -O2 vectorizes only loops free of
// branches whose count is a multiple of the vector width.
void screen_row(const float* __restrict lum, const float* __restrict r, const float* __restrict g,
                const float* __restrict b, const float* __restrict glo, const float* __restrict ghi,
                const float* __restrict rlo, const float* __restrict rhi, int32_t* __restrict flag,
                int width) {
  constexpr int kBlock = 16;
  const int blocked = width / kBlock * kBlock;
  for (int x0 = 0; x0 < width; x0 += kBlock) {
    const int n = x0 < blocked ? kBlock : width - x0;
    if (n == kBlock) {
      for (int j = 0; j < kBlock; ++j) flag[x0 + j] = screen(lum, r, g, b, glo, ghi, rlo, rhi, x0 + j);
    } else {
      for (int j = 0; j < n; ++j) flag[x0 + j] = screen(lum, r, g, b, glo, ghi, rlo, rhi, x0 + j);
    }
  }
}

}  // namespace

// Every cell's trackers take the frame's sample; a sample in the tracker's
// quiet range is skipped (it would change nothing and report nothing): only
// the cells screen_row flags go through update().
void FlashDetector::follow_cells(const CellMeans& cells) {
  general_.ups = general_.downs = red_.ups = red_.downs = 0;
  flags_.resize(grid_.width);
  int32_t* flag = flags_.data();
  for (int y = 0; y < grid_.height; ++y) {
    const float* lum = cells.luminance.ptr<float>(y);
    const float *r = cells.red.ptr<float>(y), *g = cells.green.ptr<float>(y),
                *b = cells.blue.ptr<float>(y);
    int8_t* general = general_.direction.ptr<int8_t>(y);
    int8_t* red = red_.direction.ptr<int8_t>(y);
    const int row = y * grid_.width;
    const float *glo = general_.quiet_lo.data() + row, *ghi = general_.quiet_hi.data() + row;
    const float *rlo = red_.quiet_lo.data() + row, *rhi = red_.quiet_hi.data() + row;
    screen_row(lum, r, g, b, glo, ghi, rlo, rhi, flag, grid_.width);
    std::memset(general, 0, grid_.width);
    std::memset(red, 0, grid_.width);
    for (int x = 0; x < grid_.width; ++x) {
      if (!flag[x]) continue;
      const int i = row + x;
      if (flag[x] & 1) {
        const Swing dir = general_.trackers[i].update({lum[x], false}, general_.rule);
        general_.trackers[i].quiet_range(general_.rule, general_.quiet_lo[i], general_.quiet_hi[i]);
        general[x] = static_cast<int8_t>(dir);
        general_.ups += dir == Swing::up;
        general_.downs += dir == Swing::down;
      }
      if (flag[x] & 2) {
        const Swing dir = red_.trackers[i].update(red_sample(r[x], g[x], b[x]), red_.rule);
        red_.trackers[i].quiet_range(red_.rule, red_.quiet_lo[i], red_.quiet_hi[i]);
        red[x] = static_cast<int8_t>(dir);
        red_.ups += dir == Swing::up;
        red_.downs += dir == Swing::down;
      }
    }
  }
}

FlashFrame FlashDetector::add_cells(double t_s, const CellMeans& cells) {
  CV_Assert(cells.luminance.size() == grid_ && cells.red.size() == grid_);
  follow_cells(cells);
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

}  // namespace clipwarden::flash
