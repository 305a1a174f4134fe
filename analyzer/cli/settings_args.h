// The analysis options shared by analyze, gate and inspect: --preset,
// --width, --threads, --fps, --policy.
#pragma once

#include <string>
#include <vector>

#include "analyzer/cli/args.h"
#include "clipwarden/analysis.h"
#include "clipwarden/html_report.h"
#include "clipwarden/policy.h"
#include "clipwarden/report.h"

namespace clipwarden::cli {

struct AnalysisOptions {
  AnalysisSettings settings;
  Policy policy;
};

std::vector<OptionSpec> analysis_option_specs();
Expected<AnalysisOptions> analysis_options_from_args(const ParsedArgs& args);

// What the HTML page needs beyond the report (clipwarden/html_report.h).
struct ReportExtras {
  // The settings the clip was analysed with: the page decodes the clip again
  // at the same working size to picture the worst frames. Null: read back
  // from report.settings.
  const AnalysisSettings* settings = nullptr;
  // Thumbnails kept during analysis (AnalysisHooks::on_frame). Null or
  // empty: the page's own pass over the clip collects them.
  const std::vector<Thumbnail>* thumbnails = nullptr;
  HtmlOptions html;  // e.g. manifest facts (prompt, model) shown on the page
};

// Writes <base>.json and, when html is set, <base>.html. The page is
// written even when the clip can no longer be decoded (without pictures,
// saying why).
Status write_reports(const Report& report, const std::string& base, bool html,
                     const ReportExtras& extras = {});

// The analysis settings recorded in a report (clipwarden::settings_to_json),
// with defaults for anything missing.
AnalysisSettings settings_from_report(const Report& report);

}  // namespace clipwarden::cli
