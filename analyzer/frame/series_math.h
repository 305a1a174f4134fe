// Small statistics on per-frame series (NaN = undefined, skipped).
#pragma once

#include <algorithm>
#include <cstddef>
#include <span>
#include <vector>

namespace clipwarden {

// Defined values only.
std::vector<double> defined_values(std::span<const double> series);

// Linear-interpolated quantile (q in [0,1]) of the defined values, as
// numpy.percentile's default method; NaN when none are defined.
double quantile(std::vector<double> values, double q);

// The same on values already sorted ascending (no copy); NaN when empty or
// when q lies outside [0,1].
double quantile_of_sorted(std::span<const double> sorted, double q);

// The median as an element of the data: the middle value for an odd count,
// the upper of the two middle ones for an even count (numpy.median would
// average those two). Linear time (std::nth_element); reorders `values`,
// which must not be empty. For the many places that want a typical level
// fast and need no interpolation.
template <class T>
T upper_median_in_place(std::span<T> values) {
  const auto middle = values.begin() + static_cast<std::ptrdiff_t>(values.size() / 2);
  std::nth_element(values.begin(), middle, values.end());
  return *middle;
}
template <class T>
T upper_median_in_place(std::vector<T>& values) {
  return upper_median_in_place(std::span<T>(values));
}

// Median absolute deviation about the median (unscaled).
double median_absolute_deviation(const std::vector<double>& values);

// Centred running median with half-width h (window 2h+1, shrunk at the
// ends), over defined values only; undefined inputs stay undefined.
std::vector<double> running_median(std::span<const double> series, int half_width);

// Theil-Sen line through (i, series[i]) over the defined values: slope =
// median of the slopes of all pairs, intercept = median of y - slope * i
// (Sen 1968; scipy.stats.theilslopes with method='joint'). A robust line:
// up to about 29% of the points can lie anywhere without moving it. NaN
// slope and intercept with fewer than two defined values.
struct Line {
  double slope = 0;
  double intercept = 0;
  double at(double i) const { return intercept + slope * i; }
};
Line theil_sen_line(std::span<const double> series);

// The slow level of a series: the centred running median of half-width h
// where the whole window fits in the series, and near either end (where it
// does not) the Theil-Sen line through the nearest `edge_frames` values,
// evaluated at the frame. A median window shrunk at an end lags a trend (a
// brightening that goes on to the last frame reads as a pulse), while a
// line follows it; the line is robust, so a short pulse at the first or
// last frames still stands out. Undefined inputs stay undefined.
std::vector<double> running_level(std::span<const double> series, int half_width, int edge_frames);

// Median frame interval of a timestamp series, seconds; 0 if fewer than 2.
double median_frame_interval_s(std::span<const double> times_s);

}  // namespace clipwarden
