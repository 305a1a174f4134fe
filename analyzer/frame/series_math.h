// Small statistics on per-frame series (NaN = undefined, skipped).
#pragma once

#include <span>
#include <vector>

namespace clipwarden {

// Defined values only.
std::vector<double> defined_values(std::span<const double> series);

// Linear-interpolated quantile (q in [0,1]) of the defined values, as
// numpy.percentile's default method; NaN when none are defined.
double quantile(std::vector<double> values, double q);

// Median absolute deviation about the median (unscaled).
double median_absolute_deviation(const std::vector<double>& values);

// Centred running median with half-width h (window 2h+1, shrunk at the
// ends), over defined values only; undefined inputs stay undefined.
std::vector<double> running_median(std::span<const double> series, int half_width);

// Median frame interval of a timestamp series, seconds; 0 if fewer than 2.
double median_frame_interval_s(std::span<const double> times_s);

}  // namespace clipwarden
