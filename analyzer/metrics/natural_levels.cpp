#include "analyzer/metrics/natural_levels.h"

#include <algorithm>
#include <cmath>
#include <limits>

namespace clipwarden {
namespace {

constexpr double kOpen = std::numeric_limits<double>::infinity();

// Derived 2026-12-04 from the 37 camera clips of the real-footage corpus
// (docs/accuracy.md, "Natural levels"): per bin the 99th percentile of each
// measure over the clips' frame pairs, each clip weighing at most 60 pairs,
// levels never falling as motion grows, at the default settings (512 px,
// balanced preset); re-derived 2026-12-05 with warp_error_smooth added (the
// other three levels came out the same). The last number is the pairs in
// the bin.
constexpr NaturalBin kBins[] = {
    {0.0, 0.25, {0.004137, 0.01368, 12.87, 0.001219}, 1995},
    {0.25, 0.5, {0.005752, 0.02081, 66.7, 0.001915}, 408},
    {0.5, 1.0, {0.006167, 0.03422, 70.1, 0.002044}, 553},
    {1.0, 2.0, {0.007262, 0.03422, 70.8, 0.002303}, 794},
    {2.0, 4.0, {0.01038, 0.03422, 70.8, 0.002303}, 468},
    {4.0, 8.0, {0.01192, 0.03422, 76.07, 0.004985}, 347},
    {8.0, kOpen, {0.01367, 0.04288, 81.57, 0.006962}, 183},
};

// A bin's centre on the log-motion axis: the geometric mean of its edges;
// the first bin (from 0) and the open last bin use their finite edge.
double centre_log(const NaturalBin& b) {
  if (b.motion_from_px <= 0) return std::log(b.motion_to_px / 2);
  if (!std::isfinite(b.motion_to_px)) return std::log(b.motion_from_px * 1.5);
  return 0.5 * (std::log(b.motion_from_px) + std::log(b.motion_to_px));
}

}  // namespace

std::span<const NaturalBin> natural_bins() { return kBins; }

double natural_level(NaturalMeasure measure, double motion_px) {
  if (std::isnan(motion_px)) return std::numeric_limits<double>::quiet_NaN();
  const int m = static_cast<int>(measure);
  const auto bins = natural_bins();
  const double x = std::log(std::max(motion_px, 1e-3));
  if (x <= centre_log(bins.front())) return bins.front().level[m];
  for (size_t i = 1; i < bins.size(); ++i) {
    const double x1 = centre_log(bins[i]);
    if (x > x1) continue;
    const double x0 = centre_log(bins[i - 1]);
    const double w = (x - x0) / (x1 - x0);
    return bins[i - 1].level[m] + w * (bins[i].level[m] - bins[i - 1].level[m]);
  }
  return bins.back().level[m];
}

double natural_ratio(NaturalMeasure measure, double value, double motion_px) {
  const double level = natural_level(measure, motion_px);
  if (std::isnan(value) || std::isnan(level) || level <= 0)
    return std::numeric_limits<double>::quiet_NaN();
  return value / level;
}

}  // namespace clipwarden
