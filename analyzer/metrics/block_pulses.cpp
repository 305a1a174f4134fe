#include "analyzer/metrics/block_pulses.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdlib>
#include <limits>
#include <numeric>

#include "analyzer/frame/series_math.h"

namespace clipwarden {

namespace {

// Calls fn(block, y0, y1, x0, x1) for each block of a cols x rows grid over
// a plane of `size` (block = row * cols + col; rows [y0, y1), columns
// [x0, x1)).
template <class Fn>
void for_each_block(cv::Size size, int cols, int rows, Fn&& fn) {
  for (int by = 0; by < rows; ++by) {
    const int y0 = by * size.height / rows, y1 = (by + 1) * size.height / rows;
    for (int bx = 0; bx < cols; ++bx)
      fn(static_cast<size_t>(by) * cols + bx, y0, y1, bx * size.width / cols,
         (bx + 1) * size.width / cols);
  }
}

// Calls fn(cur, warped_prev) for each valid pixel of rows [y0, y1), columns
// [x0, x1) (every pixel when `valid` is empty).
template <class Fn>
void for_each_valid_pixel(const cv::Mat& cur, const cv::Mat& warped_prev, const cv::Mat& valid,
                          int y0, int y1, int x0, int x1, Fn&& fn) {
  for (int y = y0; y < y1; ++y) {
    const float* c = cur.ptr<float>(y);
    const float* w = warped_prev.ptr<float>(y);
    const uint8_t* v = valid.empty() ? nullptr : valid.ptr<uint8_t>(y);
    for (int x = x0; x < x1; ++x)
      if (!v || v[x]) fn(c[x], w[x]);
  }
}

// The median change if at least three quarters of the pixels move the same
// way (the quartile on the far side has the median's sign), else 0: a
// brightness pulse lifts or lowers a whole region, while a mouth opening or
// an object turning changes part of a block and leaves the rest.
float uniform_change(std::vector<float>& diffs) {
  // Order statistics by partial sorting. Once the median's place is fixed,
  // the n/2 values before it are the n/2 smallest, so the lower quartile is
  // found among them alone (and the upper among those after it); for tiny
  // n a quartile may fall on the median's own place.
  const auto at = [&](size_t k, size_t from, size_t to) {
    if (k < from || k >= to) return diffs[k];
    std::nth_element(diffs.begin() + from, diffs.begin() + k, diffs.begin() + to);
    return diffs[k];
  };
  const size_t n = diffs.size();
  const float median = at(n / 2, 0, n);
  if (median > 0) return at(n / 4, 0, n / 2) > 0 ? median : 0.0f;
  if (median < 0) return at(n - 1 - n / 4, n / 2 + 1, n) < 0 ? median : 0.0f;
  return 0.0f;
}

}  // namespace

std::vector<float> block_luminance_changes(const cv::Mat& cur, const cv::Mat& warped_prev,
                                           const cv::Mat& valid, int cols, int rows,
                                           float level_floor) {
  std::vector<float> out(static_cast<size_t>(cols) * rows, std::numeric_limits<float>::quiet_NaN());
  std::vector<float> diffs;
  for_each_block(cur.size(), cols, rows, [&](size_t block, int y0, int y1, int x0, int x1) {
    diffs.clear();
    double level = 0;
    for_each_valid_pixel(cur, warped_prev, valid, y0, y1, x0, x1, [&](float c, float w) {
      diffs.push_back(c - w);
      level += w;
    });
    const size_t area = static_cast<size_t>(y1 - y0) * (x1 - x0);
    if (diffs.empty() || 2 * diffs.size() < area) return;
    const float change = uniform_change(diffs);
    out[block] =
        level_floor > 0
            ? change / std::max(level_floor,
                                static_cast<float>(level / static_cast<double>(diffs.size())))
            : change;
  });
  return out;
}

namespace {

// Sums over a rectangle's valid pixels of the current (c) and the warped
// previous (w) luminance, their squares and their product. In double: a
// block holds up to a few thousand pixels.
struct PixelSums {
  double n = 0, c = 0, w = 0, cc = 0, ww = 0, cw = 0;
  PixelSums& operator+=(const PixelSums& o) {
    n += o.n, c += o.c, w += o.w, cc += o.cc, ww += o.ww, cw += o.cw;
    return *this;
  }
};

PixelSums pixel_sums(const cv::Mat& cur, const cv::Mat& warped_prev, const cv::Mat& valid, int y0,
                     int y1, int x0, int x1) {
  PixelSums s;
  for_each_valid_pixel(cur, warped_prev, valid, y0, y1, x0, x1, [&](float c, float w) {
    s.n += 1, s.c += c, s.w += w;
    s.cc += double(c) * c, s.ww += double(w) * w, s.cw += double(c) * w;
  });
  return s;
}

// First and second moments of c and w from their sums over a rectangle of
// `area` pixels; n = 0 where fewer than half its pixels are valid (or
// fewer than 2).
struct BlockMoments {
  double n = 0, mean_c = 0, mean_w = 0, var_c = 0, var_w = 0, cov = 0;
};

BlockMoments moments_of(const PixelSums& s, double area) {
  if (s.n < 2 || 2 * s.n < area) return {};
  const double mc = s.c / s.n, mw = s.w / s.n;
  return {s.n, mc, mw, std::max(0.0, s.cc / s.n - mc * mc), std::max(0.0, s.ww / s.n - mw * mw),
          s.cw / s.n - mc * mw};
}

double area_of(int y0, int y1, int x0, int x1) { return static_cast<double>(y1 - y0) * (x1 - x0); }

BlockMoments block_moments(const cv::Mat& cur, const cv::Mat& warped_prev, const cv::Mat& valid,
                           int y0, int y1, int x0, int x1) {
  return moments_of(pixel_sums(cur, warped_prev, valid, y0, y1, x0, x1), area_of(y0, y1, x0, x1));
}

}  // namespace

std::vector<float> block_texture_agreement(const cv::Mat& cur, const cv::Mat& warped_prev,
                                           const cv::Mat& valid, int cols, int rows,
                                           float min_relative_spread) {
  std::vector<float> out(static_cast<size_t>(cols) * rows, std::numeric_limits<float>::quiet_NaN());
  for_each_block(cur.size(), cols, rows, [&](size_t block, int y0, int y1, int x0, int x1) {
    const BlockMoments m = block_moments(cur, warped_prev, valid, y0, y1, x0, x1);
    if (m.n == 0) return;
    const double floor_c = min_relative_spread * std::max(m.mean_c, 1e-6);
    const double floor_w = min_relative_spread * std::max(m.mean_w, 1e-6);
    if (m.var_c <= floor_c * floor_c && m.var_w <= floor_w * floor_w) return;
    const double denom = std::sqrt(m.var_c * m.var_w);
    // One side flat, the other not: the pattern appeared or vanished.
    out[block] = denom > 0 ? static_cast<float>(m.cov / denom) : 0.0f;
  });
  return out;
}

std::vector<LightFit> block_light_fit(const cv::Mat& cur, const cv::Mat& warped_prev,
                                      const cv::Mat& valid, int cols, int rows, float level_floor) {
  constexpr float kNaN = std::numeric_limits<float>::quiet_NaN();
  std::vector<LightFit> out(static_cast<size_t>(cols) * rows, LightFit{kNaN, kNaN});
  for_each_block(cur.size(), cols, rows, [&](size_t block, int y0, int y1, int x0, int x1) {
    // Each quarter of the block fitted on its own, so the edge of a lit
    // region crossing the block is fitted by the quarters on either side.
    // The quarters tile the block: one pass over its pixels gives both.
    const int ym = (y0 + y1) / 2, xm = (x0 + x1) / 2;
    const std::array<std::array<int, 4>, 4> quarters = {
        {{y0, ym, x0, xm}, {y0, ym, xm, x1}, {ym, y1, x0, xm}, {ym, y1, xm, x1}}};
    std::array<PixelSums, 4> quarter_sums;
    PixelSums block_sums;
    for (size_t i = 0; i < quarters.size(); ++i) {
      const auto& [qy0, qy1, qx0, qx1] = quarters[i];
      quarter_sums[i] = pixel_sums(cur, warped_prev, valid, qy0, qy1, qx0, qx1);
      block_sums += quarter_sums[i];
    }
    const BlockMoments m = moments_of(block_sums, area_of(y0, y1, x0, x1));
    if (m.n == 0) return;
    double residual_sum = 0, weight = 0;
    for (size_t i = 0; i < quarters.size(); ++i) {
      const auto& [qy0, qy1, qx0, qx1] = quarters[i];
      const BlockMoments q = moments_of(quarter_sums[i], area_of(qy0, qy1, qx0, qx1));
      if (q.n == 0) continue;
      // d = c - w: its variance and covariance with w from the moments.
      const double var_d = std::max(0.0, q.var_c + q.var_w - 2 * q.cov);
      const double cov_wd = q.cov - q.var_w;
      // The residual variance of a least-squares line: var(d) (1 - r^2).
      residual_sum += q.n * (q.var_w > 0 ? std::max(0.0, var_d - cov_wd * cov_wd / q.var_w) : var_d);
      weight += q.n;
    }
    if (weight == 0) return;
    const double level = std::max<double>(level_floor, m.mean_w);
    out[block] = {static_cast<float>((m.mean_c - m.mean_w) / level),
                  static_cast<float>(std::sqrt(residual_sum / weight) / level)};
  });
  return out;
}

std::vector<float> block_own_motion(const cv::Mat& flow, const cv::Matx33d& camera_homography,
                                    const cv::Mat& valid, int cols, int rows) {
  std::vector<float> out(static_cast<size_t>(cols) * rows, std::numeric_limits<float>::quiet_NaN());
  const cv::Matx33d back = camera_homography.inv();
  for_each_block(flow.size(), cols, rows, [&](size_t block, int y0, int y1, int x0, int x1) {
    double n = 0, sum = 0;
    for (int y = y0; y < y1; ++y) {
      const cv::Vec2f* f = flow.ptr<cv::Vec2f>(y);
      const uint8_t* v = valid.empty() ? nullptr : valid.ptr<uint8_t>(y);
      for (int x = x0; x < x1; ++x) {
        if (v && !v[x]) continue;
        const double w = back(2, 0) * x + back(2, 1) * y + back(2, 2);
        if (std::abs(w) < 1e-12) continue;
        const double cx = (back(0, 0) * x + back(0, 1) * y + back(0, 2)) / w - x;
        const double cy = (back(1, 0) * x + back(1, 1) * y + back(1, 2)) / w - y;
        n += 1;
        sum += std::hypot(f[x][0] - cx, f[x][1] - cy);
      }
    }
    const double area = static_cast<double>(y1 - y0) * (x1 - x0);
    if (n < 1 || 2 * n < area) return;
    out[block] = static_cast<float>(sum / n);
  });
  return out;
}

std::vector<bool> blocks_near_movers(const std::vector<float>& own_motion, int cols, int rows,
                                     float max_motion) {
  std::vector<bool> near(static_cast<size_t>(cols) * rows, false);
  for (int r = 0; r < rows; ++r)
    for (int c = 0; c < cols; ++c) {
      const float m = own_motion[static_cast<size_t>(r) * cols + c];
      if (!(m > max_motion)) continue;
      for (int dr = -1; dr <= 1; ++dr)
        for (int dc = -1; dc <= 1; ++dc) {
          const int rr = r + dr, cc = c + dc;
          if (rr >= 0 && rr < rows && cc >= 0 && cc < cols)
            near[static_cast<size_t>(rr) * cols + cc] = true;
        }
    }
  return near;
}

std::vector<Pulse> pulses_with_neighbours(const std::vector<Pulse>& pulses, int cols) {
  std::vector<Pulse> kept;
  for (size_t i = 0; i < pulses.size(); ++i) {
    const Pulse& p = pulses[i];
    const int row = p.block / cols, col = p.block % cols;
    for (size_t j = 0; j < pulses.size(); ++j) {
      const Pulse& q = pulses[j];
      const int dr = q.block / cols - row, dc = q.block % cols - col;
      if (j == i || q.block == p.block || std::abs(dr) > 1 || std::abs(dc) > 1) continue;
      if (q.start_frame <= p.end_frame && p.start_frame <= q.end_frame) {
        kept.push_back(p);
        break;
      }
    }
  }
  return kept;
}

std::vector<int> places_pulsing_around(const std::vector<Pulse>& pulses, std::span<const double> times_s,
                                       double within_s, int cols, int rows) {
  const auto time_of = [&](int64_t f) {
    if (times_s.empty()) return static_cast<double>(f);
    return times_s[static_cast<size_t>(std::clamp<int64_t>(f, 0, static_cast<int64_t>(times_s.size()) - 1))];
  };
  // The pulses by start time: those that reach [from, to] start within
  // [from - longest span, to], one range of them.
  std::vector<size_t> by_start(pulses.size());
  std::iota(by_start.begin(), by_start.end(), size_t{0});
  std::sort(by_start.begin(), by_start.end(), [&](size_t a, size_t b) {
    return pulses[a].start_frame < pulses[b].start_frame;
  });
  std::vector<double> starts;
  double longest = 0;
  for (size_t k : by_start) {
    starts.push_back(time_of(pulses[k].start_frame));
    longest = std::max(longest, time_of(pulses[k].end_frame) - starts.back());
  }
  std::vector<int> out(pulses.size(), 0);
  std::vector<uint8_t> pulsing;  // per block: 0 quiet, 1 pulsing, 2 counted in a place
  std::vector<int> stack;
  for (size_t i = 0; i < pulses.size(); ++i) {
    const double from = time_of(pulses[i].start_frame) - within_s, to = time_of(pulses[i].end_frame) + within_s;
    pulsing.assign(static_cast<size_t>(cols) * rows, 0);
    for (auto it = std::lower_bound(starts.begin(), starts.end(), from - longest);
         it != starts.end() && *it <= to; ++it) {
      const Pulse& q = pulses[by_start[static_cast<size_t>(it - starts.begin())]];
      if (q.block >= 0 && q.block < cols * rows && time_of(q.end_frame) >= from)
        pulsing[static_cast<size_t>(q.block)] = 1;
    }
    int places = 0;
    for (int b = 0; b < cols * rows; ++b) {
      if (pulsing[b] != 1) continue;
      ++places;  // a new place: mark every block connected to it
      pulsing[b] = 2;
      stack.assign(1, b);
      while (!stack.empty()) {
        const int x = stack.back();
        stack.pop_back();
        for (int dr = -1; dr <= 1; ++dr)
          for (int dc = -1; dc <= 1; ++dc) {
            const int r = x / cols + dr, c = x % cols + dc;
            if (r < 0 || r >= rows || c < 0 || c >= cols || pulsing[r * cols + c] != 1) continue;
            pulsing[r * cols + c] = 2;
            stack.push_back(r * cols + c);
          }
      }
    }
    out[i] = places;
  }
  return out;
}

double recurring_quantile(std::span<const double> values, std::span<const double> times_s,
                          double q, double apart_s) {
  const double quantile_level = quantile(defined_values(values), q);
  if (std::isnan(quantile_level)) return quantile_level;
  // For each frame j, the highest value among the frames more than apart_s
  // before it (times ascend, so those frames are a growing prefix).
  double apart_level = 0, earlier_max = -std::numeric_limits<double>::infinity();
  const size_t n = std::min(values.size(), times_s.size());
  for (size_t i = 0, j = 0; j < n; ++j) {
    for (; i < j && times_s[i] < times_s[j] - apart_s; ++i)
      if (!std::isnan(values[i])) earlier_max = std::max(earlier_max, values[i]);
    if (!std::isnan(values[j])) apart_level = std::max(apart_level, std::min(earlier_max, values[j]));
  }
  return std::min(quantile_level, apart_level);
}

float remove_common_change(std::span<float> changes) {
  std::vector<float> known;
  for (float c : changes)
    if (!std::isnan(c)) known.push_back(c);
  if (known.empty()) return 0;
  auto mid = known.begin() + known.size() / 2;
  std::nth_element(known.begin(), mid, known.end());
  const float common = *mid;
  for (float& c : changes)
    if (!std::isnan(c)) c -= common;
  return common;
}

BlockPulseTracker::BlockPulseTracker(int blocks, double min_swing, double max_pulse_s)
    : blocks_(static_cast<size_t>(blocks)), max_pulse_s_(max_pulse_s) {
  rule_.min_change = static_cast<float>(min_swing);
}

void BlockPulseTracker::restart() { std::fill(blocks_.begin(), blocks_.end(), Block{}); }

void BlockPulseTracker::add(int64_t frame, double t_s, std::span<const float> changes) {
  for (size_t b = 0; b < blocks_.size() && b < changes.size(); ++b) {
    Block& k = blocks_[b];
    if (!k.started) {
      k.started = true;
      k.swings.update({0.0f, false}, rule_);  // the level before the first change
    }
    if (std::isnan(changes[b])) continue;
    k.level += changes[b];
    const float extreme_before = k.swings.extreme();
    const bool turned = k.swings.update({k.level, false}, rule_) != flash::Swing::none;
    if (turned) {
      k.open_pulse = -1;
      // With a swing confirmed just before (in the other direction, by
      // construction) and recently enough: a pulse.
      if (k.has_turn && t_s - k.turn_t_s <= max_pulse_s_ + 1e-9) {
        k.open_pulse = static_cast<int>(pulses_.size());
        k.open_first = std::fabs(k.swings.origin() - k.turn_origin);
        pulses_.push_back({static_cast<int>(b), k.turn_frame, frame, 0});
      }
      k.has_turn = true;
      k.turn_frame = frame;
      k.turn_t_s = t_s;
      k.turn_origin = k.swings.origin();
    }
    if (k.open_pulse < 0) continue;
    // The swing back is followed until it has come all the way back (as
    // far as the first swing went) or the pulse time is up: a level that
    // keeps drifting afterwards is not part of the pulse.
    if (t_s - k.turn_t_s > max_pulse_s_ + 1e-9) {
      k.open_pulse = -1;
      continue;
    }
    if (turned || k.swings.extreme() != extreme_before) {
      Pulse& p = pulses_[k.open_pulse];
      const float back = std::fabs(k.swings.extreme() - k.swings.origin());
      p.end_frame = frame;
      p.amplitude = std::min(k.open_first, back);
      if (back >= k.open_first) k.open_pulse = -1;
    }
  }
}

}  // namespace clipwarden
