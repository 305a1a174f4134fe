#include "analyzer/frame/series_math.h"

#include <algorithm>
#include <cmath>
#include <limits>

namespace clipwarden {

std::vector<double> defined_values(std::span<const double> series) {
  std::vector<double> out;
  out.reserve(series.size());
  for (double v : series)
    if (!std::isnan(v)) out.push_back(v);
  return out;
}

double quantile(std::vector<double> values, double q) {
  std::sort(values.begin(), values.end());
  return quantile_of_sorted(values, q);
}

double quantile_of_sorted(std::span<const double> sorted, double q) {
  if (sorted.empty() || !(q >= 0.0 && q <= 1.0)) return std::numeric_limits<double>::quiet_NaN();
  const double pos = q * static_cast<double>(sorted.size() - 1);
  const size_t lo = static_cast<size_t>(std::floor(pos));
  const size_t hi = std::min(lo + 1, sorted.size() - 1);
  return sorted[lo] + (pos - static_cast<double>(lo)) * (sorted[hi] - sorted[lo]);
}

double median_absolute_deviation(const std::vector<double>& values) {
  if (values.empty()) return std::numeric_limits<double>::quiet_NaN();
  const double median = quantile(values, 0.5);
  std::vector<double> dev;
  dev.reserve(values.size());
  for (double v : values) dev.push_back(std::fabs(v - median));
  return quantile(std::move(dev), 0.5);
}

std::vector<double> running_median(std::span<const double> series, int half_width) {
  const int n = static_cast<int>(series.size());
  std::vector<double> out(series.size(), std::numeric_limits<double>::quiet_NaN());
  std::vector<double> window;
  for (int i = 0; i < n; ++i) {
    if (std::isnan(series[i])) continue;
    window.clear();
    for (int j = std::max(0, i - half_width); j <= std::min(n - 1, i + half_width); ++j)
      if (!std::isnan(series[j])) window.push_back(series[j]);
    out[i] = quantile(window, 0.5);
  }
  return out;
}

Line theil_sen_line(std::span<const double> series) {
  constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
  std::vector<double> slopes;
  for (size_t a = 0; a < series.size(); ++a) {
    if (std::isnan(series[a])) continue;
    for (size_t b = a + 1; b < series.size(); ++b)
      if (!std::isnan(series[b]))
        slopes.push_back((series[b] - series[a]) / static_cast<double>(b - a));
  }
  if (slopes.empty()) return {kNaN, kNaN};
  Line line;
  line.slope = quantile(std::move(slopes), 0.5);
  std::vector<double> offsets;
  for (size_t i = 0; i < series.size(); ++i)
    if (!std::isnan(series[i])) offsets.push_back(series[i] - line.slope * static_cast<double>(i));
  line.intercept = quantile(std::move(offsets), 0.5);
  return line;
}

std::vector<double> running_level(std::span<const double> series, int half_width, int edge_frames) {
  std::vector<double> out = running_median(series, half_width);
  const int n = static_cast<int>(series.size());
  if (n < 2) return out;
  const size_t width = static_cast<size_t>(std::clamp(edge_frames, 2, n));
  const Line head = theil_sen_line(series.first(width));
  const Line tail = theil_sen_line(series.last(width));
  const int tail_origin = n - static_cast<int>(width);
  for (int i = 0; i < n; ++i) {
    if (std::isnan(series[i]) || (i >= half_width && i + half_width < n)) continue;
    // Frames in both end zones (a series shorter than a window) take the
    // nearer end's line.
    const bool near_head = i < n - 1 - i;
    const Line& line = near_head ? head : tail;
    const double x = near_head ? i : i - tail_origin;
    if (!std::isnan(line.slope)) out[i] = line.at(x);
  }
  return out;
}

double median_frame_interval_s(std::span<const double> times_s) {
  if (times_s.size() < 2) return 0;
  std::vector<double> d;
  d.reserve(times_s.size() - 1);
  for (size_t i = 1; i < times_s.size(); ++i) d.push_back(times_s[i] - times_s[i - 1]);
  return quantile(std::move(d), 0.5);
}

}  // namespace clipwarden
