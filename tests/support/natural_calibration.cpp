#include "support/natural_calibration.h"

#include <algorithm>
#include <cmath>
#include <cstdio>

namespace clipwarden::calibration {
namespace {

const char* const kMeasureSeries[kNaturalMeasures] = {"warp_error", "warp_error_long",
                                                      "occluded_pct", "warp_error_smooth"};

struct Weighted {
  double value;
  double weight;
};

// The smallest value whose cumulative weight reaches q of the total.
double weighted_quantile(std::vector<Weighted> v, double q) {
  if (v.empty()) return NAN;
  std::sort(v.begin(), v.end(),
            [](const Weighted& a, const Weighted& b) { return a.value < b.value; });
  double total = 0;
  for (const auto& w : v) total += w.weight;
  double running = 0;
  for (const auto& w : v) {
    running += w.weight;
    if (running >= q * total) return w.value;
  }
  return v.back().value;
}

std::string number(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.4g", v);
  return buf;
}

}  // namespace

std::vector<NaturalBin> derive_natural_levels(const std::vector<const Report*>& camera) {
  const auto kept = natural_bins();
  std::vector<NaturalBin> bins(kept.begin(), kept.end());
  std::vector<std::vector<Weighted>> samples(bins.size() * kNaturalMeasures);
  std::vector<double> bin_weight(bins.size(), 0.0);
  std::vector<int> bin_pairs(bins.size(), 0);
  for (const Report* r : camera) {
    const MetricSeries* motion = r->find_series("motion_px");
    if (!motion) continue;
    int pairs = 0;
    for (double m : motion->values) pairs += is_defined(m);
    if (pairs == 0) continue;
    const double weight = std::min(1.0, kPairsPerClip / pairs);
    for (size_t i = 0; i < motion->values.size(); ++i) {
      const double m = motion->values[i];
      if (!is_defined(m)) continue;
      size_t b = 0;
      while (b + 1 < bins.size() && m >= bins[b].motion_to_px) ++b;
      bin_weight[b] += weight;
      ++bin_pairs[b];
      for (int k = 0; k < kNaturalMeasures; ++k) {
        const MetricSeries* s = r->find_series(kMeasureSeries[k]);
        if (s && i < s->values.size() && is_defined(s->values[i]))
          samples[b * kNaturalMeasures + k].push_back({s->values[i], weight});
      }
    }
  }
  for (size_t b = 0; b < bins.size(); ++b) {
    bins[b].pairs = bin_pairs[b];
    for (int k = 0; k < kNaturalMeasures; ++k) {
      double level = weighted_quantile(samples[b * kNaturalMeasures + k], kNaturalQuantile);
      if (bin_weight[b] < kMinBinWeight || std::isnan(level))
        level = b > 0 ? bins[b - 1].level[k] : NAN;
      if (b > 0) level = std::max(level, bins[b - 1].level[k]);
      bins[b].level[k] = level;
    }
  }
  // A sparse first bin takes the first well-filled bin's levels.
  for (size_t b = bins.size(); b-- > 0;)
    for (int k = 0; k < kNaturalMeasures; ++k)
      if (std::isnan(bins[b].level[k]) && b + 1 < bins.size())
        bins[b].level[k] = bins[b + 1].level[k];
  return bins;
}

std::string natural_levels_cpp(const std::vector<NaturalBin>& bins) {
  std::string out;
  for (const auto& b : bins) {
    out += "    {" + number(b.motion_from_px) + ", " +
           (std::isfinite(b.motion_to_px) ? number(b.motion_to_px) : "kOpen") + ", {";
    for (int k = 0; k < kNaturalMeasures; ++k) out += (k ? ", " : "") + number(b.level[k]);
    out += "}, " + std::to_string(b.pairs) + "},\n";
  }
  return out;
}

std::string natural_levels_markdown(const std::vector<NaturalBin>& bins) {
  std::string out = "| motion (px/frame) | pairs";
  for (const char* measure : kMeasureSeries) out += std::string(" | ") + measure + " p99";
  out += " |\n|---|---";
  for (int k = 0; k < kNaturalMeasures; ++k) out += "|---";
  out += "|\n";
  for (const auto& b : bins) {
    out += "| " + number(b.motion_from_px) + "–" +
           (std::isfinite(b.motion_to_px) ? number(b.motion_to_px) : "") + " | " +
           std::to_string(b.pairs);
    for (int k = 0; k < kNaturalMeasures; ++k) out += " | " + number(b.level[k]);
    out += " |\n";
  }
  return out;
}

double largest_relative_difference(const std::vector<NaturalBin>& a,
                                   std::span<const NaturalBin> b) {
  double worst = 0;
  for (size_t i = 0; i < a.size() && i < b.size(); ++i)
    for (int k = 0; k < kNaturalMeasures; ++k)
      if (b[i].level[k] > 0)
        worst = std::max(worst, std::fabs(a[i].level[k] - b[i].level[k]) / b[i].level[k]);
  return worst;
}

}  // namespace clipwarden::calibration
