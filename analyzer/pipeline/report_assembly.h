// The end of an analysis: from the per-frame table to a finished report
// (metric post-processing, segments, summary, coherence, verdict).
#pragma once

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "analyzer/metrics/metric.h"
#include "analyzer/pipeline/cadence_filter.h"
#include "analyzer/pipeline/metric_table.h"
#include "clipwarden/analysis.h"

namespace clipwarden {

struct ReportInputs {
  const std::string& path;
  const AnalysisSettings& settings;
  const Policy& policy;
  const ClipSource& source;
  std::optional<Cadence> cadence;  // when stored repeats were left out
};

Report assemble_report(const ReportInputs& in, MetricTable& table,
                       std::vector<std::unique_ptr<Metric>>& metrics);

}  // namespace clipwarden
