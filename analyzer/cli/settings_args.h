// The analysis options shared by analyze, gate and inspect: --preset,
// --width, --threads, --fps, --policy.
#pragma once

#include <string>
#include <vector>

#include "analyzer/cli/args.h"
#include "framelint/analysis.h"
#include "framelint/policy.h"
#include "framelint/report.h"

namespace framelint::cli {

struct AnalysisOptions {
  AnalysisSettings settings;
  Policy policy;
};

std::vector<OptionSpec> analysis_option_specs();
Expected<AnalysisOptions> analysis_options_from_args(const ParsedArgs& args);

// Writes <base>.json and, when html is set, <base>.html.
Status write_reports(const Report& report, const std::string& base, bool html);

}  // namespace framelint::cli
