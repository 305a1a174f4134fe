// The table of metrics. Adding a metric is one file implementing
// analyzer/metrics/metric.h, one line here, and one test with its outside
// source. Order here is the column order in report.frames, and the order of
// finish() calls (a metric may read the series of those before it).
#include "analyzer/metrics/metric.h"

namespace clipwarden {

// Factories, defined beside each metric.
std::unique_ptr<Metric> make_warp_error_metric(const AnalysisSettings&);
std::unique_ptr<Metric> make_warp_error_long_metric(const AnalysisSettings&);
std::unique_ptr<Metric> make_boiling_metric(const AnalysisSettings&);
std::unique_ptr<Metric> make_flicker_metric(const AnalysisSettings&);
std::unique_ptr<Metric> make_freeze_metric(const AnalysisSettings&);
std::unique_ptr<Metric> make_cut_metric(const AnalysisSettings&);
std::unique_ptr<Metric> make_flash_metric(const AnalysisSettings&);
std::unique_ptr<Metric> make_jerk_metric(const AnalysisSettings&);
std::unique_ptr<Metric> make_flicker_local_metric(const AnalysisSettings&);
std::unique_ptr<Metric> make_drift_metric(const AnalysisSettings&);

using MetricFactory = std::unique_ptr<Metric> (*)(const AnalysisSettings&);

static const MetricFactory kMetricTable[] = {
    make_warp_error_metric,
    make_warp_error_long_metric,
    make_flicker_metric,
    make_freeze_metric,
    make_cut_metric,
    make_flash_metric,
    make_jerk_metric,
    make_flicker_local_metric,
    make_boiling_metric,
    make_drift_metric,
};

std::vector<std::unique_ptr<Metric>> make_metrics(const AnalysisSettings& settings) {
  std::vector<std::unique_ptr<Metric>> metrics;
  for (MetricFactory make : kMetricTable) metrics.push_back(make(settings));
  return metrics;
}

}  // namespace clipwarden
