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
  if (values.empty()) return std::numeric_limits<double>::quiet_NaN();
  std::sort(values.begin(), values.end());
  const double pos = q * static_cast<double>(values.size() - 1);
  const size_t lo = static_cast<size_t>(std::floor(pos));
  const size_t hi = std::min(lo + 1, values.size() - 1);
  return values[lo] + (pos - static_cast<double>(lo)) * (values[hi] - values[lo]);
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

double median_frame_interval_s(std::span<const double> times_s) {
  if (times_s.size() < 2) return 0;
  std::vector<double> d;
  d.reserve(times_s.size() - 1);
  for (size_t i = 1; i < times_s.size(); ++i) d.push_back(times_s[i] - times_s[i - 1]);
  return quantile(std::move(d), 0.5);
}

}  // namespace clipwarden
