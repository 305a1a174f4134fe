// Reading one side of a comparison: a folder of per-clip reports (*.json,
// schema clipwarden.report/1) or a gate output folder (queue.jsonl naming
// each clip's report, with id, prompt_id, model and seed).
#pragma once

#include <string>
#include <vector>

#include "clipwarden/compare.h"
#include "clipwarden/report.h"

namespace clipwarden::compare_detail {

struct LoadedFolder {
  std::vector<ClipEntry> clips;
  std::vector<FailedInput> failed;
  bool from_queue = false;
};

// An error only when the folder itself is unusable; bad reports and bad
// queue lines are listed in `failed`.
Expected<LoadedFolder> load_report_folder(const std::string& dir, const std::string& side);

// Every comparable value of a report, keyed "metric.statistic": each
// per-frame metric's mean/p50/p95/max, "coherence.score", and
// "<metric>.segment_count" for every metric the report knows.
std::vector<std::pair<std::string, double>> comparable_values(const Report& report);

}  // namespace clipwarden::compare_detail
