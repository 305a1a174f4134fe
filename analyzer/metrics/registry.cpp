// The table of metrics. Adding a metric is one file implementing
// analyzer/metrics/metric.h, one line here, and one test with its outside
// source. Order here is the column order in report.frames.
#include "analyzer/metrics/metric.h"

namespace framelint {

// Factories, defined beside each metric.
// (The core metrics are added as the pipeline lands.)

std::vector<std::unique_ptr<Metric>> make_metrics(const AnalysisSettings& settings) {
  (void)settings;
  std::vector<std::unique_ptr<Metric>> metrics;
  return metrics;
}

}  // namespace framelint
