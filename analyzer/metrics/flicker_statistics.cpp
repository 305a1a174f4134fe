#include "analyzer/metrics/flicker_statistics.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numbers>
#include <vector>

#include <opencv2/core.hpp>

#include "analyzer/frame/series_math.h"

namespace clipwarden {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// Defined (value, time) samples in time order.
struct Samples {
  std::vector<double> t, v;
};
Samples defined_samples(std::span<const double> values, std::span<const double> times_s) {
  Samples s;
  const size_t n = std::min(values.size(), times_s.size());
  for (size_t i = 0; i < n; ++i) {
    if (std::isnan(values[i]) || std::isnan(times_s[i])) continue;
    if (!s.t.empty() && times_s[i] <= s.t.back()) continue;  // repeated timestamp
    s.t.push_back(times_s[i]);
    s.v.push_back(values[i]);
  }
  return s;
}

// Linear interpolation of the samples at t0 + k dt, k = 0..count-1.
std::vector<float> resample(const Samples& s, double dt, int count) {
  std::vector<float> out(count);
  size_t j = 0;
  for (int k = 0; k < count; ++k) {
    const double t = s.t.front() + k * dt;
    while (j + 2 < s.t.size() && s.t[j + 1] < t) ++j;
    const double span = s.t[j + 1] - s.t[j];
    const double a = std::clamp((t - s.t[j]) / span, 0.0, 1.0);
    out[k] = static_cast<float>(s.v[j] + a * (s.v[j + 1] - s.v[j]));
  }
  return out;
}

}  // namespace

double percent_flicker(std::span<const double> values) {
  const std::vector<double> v = defined_values(values);
  if (v.empty()) return kNaN;
  const auto [lo, hi] = std::minmax_element(v.begin(), v.end());
  const double sum = *hi + *lo;
  return sum > 0 ? 100.0 * (*hi - *lo) / sum : kNaN;
}

double flicker_index(std::span<const double> values) {
  const std::vector<double> v = defined_values(values);
  if (v.empty()) return kNaN;
  double total = 0;
  for (double x : v) total += x;
  if (total <= 0) return kNaN;
  const double mean = total / static_cast<double>(v.size());
  double above = 0;
  for (double x : v) above += std::max(0.0, x - mean);
  return above / total;
}

DominantFrequency dominant_frequency(std::span<const double> values,
                                     std::span<const double> times_s) {
  DominantFrequency out{kNaN, 0};
  const Samples s = defined_samples(values, times_s);
  const double dt = median_frame_interval_s(s.t);
  if (s.t.size() < 8 || dt <= 0) return out;
  const int n = static_cast<int>(std::floor((s.t.back() - s.t.front()) / dt)) + 1;
  std::vector<float> x = resample(s, dt, n);
  double mean = 0;
  for (float v : x) mean += v;
  mean /= n;
  for (int k = 0; k < n; ++k) {
    const double hann = 0.5 - 0.5 * std::cos(2 * std::numbers::pi * k / (n - 1));
    x[k] = static_cast<float>((x[k] - mean) * hann);
  }
  // Zero-padding to 4x only interpolates the spectrum, so the parabolic
  // refinement below works on a smoother peak.
  const int padded = cv::getOptimalDFTSize(4 * n);
  cv::Mat signal = cv::Mat::zeros(1, padded, CV_32F);
  std::copy(x.begin(), x.end(), signal.ptr<float>());
  cv::Mat spectrum;
  cv::dft(signal, spectrum, cv::DFT_COMPLEX_OUTPUT);
  const int half = padded / 2;
  std::vector<double> power(half + 1);
  double total = 0;
  for (int k = 0; k <= half; ++k) {
    const cv::Vec2f c = spectrum.at<cv::Vec2f>(0, k);
    power[k] = static_cast<double>(c[0]) * c[0] + static_cast<double>(c[1]) * c[1];
    if (k > 0) total += power[k];
  }
  const int peak = static_cast<int>(std::max_element(power.begin() + 1, power.end()) - power.begin());
  if (total <= 0 || power[peak] <= 0) return out;
  double offset = 0;
  if (peak > 1 && peak < half) {
    const double a = power[peak - 1], b = power[peak], c = power[peak + 1];
    const double denom = a - 2 * b + c;
    if (denom < 0) offset = std::clamp(0.5 * (a - c) / denom, -0.5, 0.5);
  }
  out.frequency_hz = (peak + offset) / (padded * dt);
  // One original-resolution bin either side of the peak is 4 padded bins.
  double near = 0;
  for (int k = std::max(1, peak - 4); k <= std::min(half, peak + 4); ++k) near += power[k];
  out.power_share = near / total;
  return out;
}

FlickerStatistics flicker_statistics(std::span<const double> track,
                                     std::span<const double> times_s, double median_window_s,
                                     double level) {
  FlickerStatistics out{kNaN, kNaN, {kNaN, 0}};
  const double dt = median_frame_interval_s(times_s);
  if (track.empty() || dt <= 0) return out;
  const int half = std::max(1, static_cast<int>(std::lround(median_window_s / 2 / dt)));
  const std::vector<double> median = running_median(track, half);
  if (std::isnan(level)) {
    const std::vector<double> defined = defined_values(track);
    level = 0;
    for (double v : defined) level += v;
    level /= std::max<size_t>(1, defined.size());
  }
  // Near the ends the running median's window is one-sided and lags a
  // ramp; only frames with a full centred window count, unless the clip is
  // too short to have any.
  const size_t n = track.size(), edge = n > 2 * static_cast<size_t>(half) ? half : 0;
  std::vector<double> fast(n, kNaN), recentred(n, kNaN);
  for (size_t i = edge; i + edge < n; ++i) {
    if (std::isnan(track[i]) || std::isnan(median[i])) continue;
    fast[i] = track[i] - median[i];
    recentred[i] = level + fast[i];
  }
  // A clip is not one clean cycle: a missed cut or a fade's edge can put a
  // single frame far off. The extremes are taken as the 2nd and 98th
  // percentiles (for a sinusoid, 0.996 of the true swing), and levels below
  // zero, which light cannot have, are clipped.
  const std::vector<double> defined_fast = defined_values(recentred);
  if (defined_fast.empty()) return out;
  const double lo = std::max(0.0, quantile(defined_fast, 0.02));
  const double hi = std::max(0.0, quantile(defined_fast, 0.98));
  out.percent_flicker = percent_flicker(std::vector<double>{lo, hi});
  std::vector<double> clipped;
  for (double v : defined_fast) clipped.push_back(std::clamp(v, lo, hi));
  out.flicker_index = flicker_index(clipped);
  out.dominant = dominant_frequency(fast, times_s);
  return out;
}

}  // namespace clipwarden
