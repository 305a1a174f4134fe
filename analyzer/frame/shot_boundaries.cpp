#include "analyzer/frame/shot_boundaries.h"

namespace clipwarden {

std::vector<bool> shot_boundaries(const Report& report) {
  const MetricSeries* cut = report.find_series("cut");
  if (!cut) return {};
  std::vector<bool> out(cut->values.size(), false);
  for (size_t t = 1; t < out.size(); ++t) out[t] = is_defined(cut->values[t]) && cut->values[t] >= kShotBoundaryCut;
  return out;
}

void clear_across_boundaries(std::vector<double>& series, const std::vector<bool>& boundaries, int span_after) {
  for (size_t t = 0; t < boundaries.size() && t < series.size(); ++t) {
    if (!boundaries[t]) continue;
    for (size_t k = t; k < series.size() && k < t + static_cast<size_t>(span_after); ++k) series[k] = kUndefined;
  }
}

}  // namespace clipwarden
