#include "analyzer/summary/summary.h"

#include <algorithm>

#include "analyzer/frame/series_math.h"

namespace clipwarden {

std::vector<MetricSummary> summarise_series(const std::vector<MetricSeries>& series) {
  std::vector<MetricSummary> out;
  for (const auto& s : series) {
    std::vector<double> v = defined_values(s.values);
    MetricSummary m;
    m.metric = s.metric;
    if (!v.empty()) {
      double sum = 0;
      for (double x : v) sum += x;
      m.mean = sum / static_cast<double>(v.size());
      m.max = *std::max_element(v.begin(), v.end());
      m.p50 = quantile(v, 0.5);
      m.p95 = quantile(std::move(v), 0.95);
    }
    out.push_back(m);
  }
  return out;
}

double coherence_score(const std::vector<Segment>& segments, int64_t frame_count) {
  if (frame_count <= 0) return 100.0;
  std::vector<double> weight(static_cast<size_t>(frame_count), 0.0);
  for (const auto& s : segments) {
    const double w = s.severity == Severity::reject ? 1.0 : s.severity == Severity::review ? 0.5 : 0.1;
    for (int64_t i = std::max<int64_t>(0, s.start_frame); i <= std::min(s.end_frame, frame_count - 1); ++i)
      weight[i] = std::max(weight[i], w);
  }
  double total = 0;
  for (double w : weight) total += w;
  return 100.0 * (1.0 - total / static_cast<double>(frame_count));
}

}  // namespace clipwarden
