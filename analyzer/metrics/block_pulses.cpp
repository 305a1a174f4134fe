#include "analyzer/metrics/block_pulses.h"

#include <algorithm>
#include <cmath>
#include <limits>

namespace clipwarden {

namespace {

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
  for (int by = 0; by < rows; ++by) {
    const int y0 = by * cur.rows / rows, y1 = (by + 1) * cur.rows / rows;
    for (int bx = 0; bx < cols; ++bx) {
      const int x0 = bx * cur.cols / cols, x1 = (bx + 1) * cur.cols / cols;
      diffs.clear();
      double level = 0;
      for (int y = y0; y < y1; ++y) {
        const float* c = cur.ptr<float>(y);
        const float* w = warped_prev.ptr<float>(y);
        const uint8_t* v = valid.empty() ? nullptr : valid.ptr<uint8_t>(y);
        for (int x = x0; x < x1; ++x)
          if (!v || v[x]) {
            diffs.push_back(c[x] - w[x]);
            level += w[x];
          }
      }
      const size_t area = static_cast<size_t>(y1 - y0) * (x1 - x0);
      if (diffs.empty() || 2 * diffs.size() < area) continue;
      const float change = uniform_change(diffs);
      out[static_cast<size_t>(by) * cols + bx] =
          level_floor > 0
              ? change / std::max(level_floor, static_cast<float>(level / static_cast<double>(diffs.size())))
              : change;
    }
  }
  return out;
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
