#include "analyzer/cli/settings_args.h"

#include "clipwarden/report_io.h"

namespace clipwarden::cli {

std::vector<OptionSpec> analysis_option_specs() {
  return {
      {"policy", true, "policy JSON file (default: the built-in policy)"},
      {"preset", true, "optical flow effort: fast, balanced (default) or thorough"},
      {"width", true, "long side of the analysis frames in px (default 512)"},
      {"threads", true, "worker threads (default: all cores)"},
      {"fps", true, "frame rate for folders of numbered images (default 24)"},
  };
}

Expected<AnalysisOptions> analysis_options_from_args(const ParsedArgs& args) {
  AnalysisOptions out;
  out.policy = default_policy();
  if (auto p = args.get("policy")) {
    auto policy = load_policy(*p);
    if (!policy) return policy.error();
    out.policy = std::move(policy.value());
  }
  if (auto p = args.get("preset")) {
    auto preset = preset_from_string(*p);
    if (!preset) return usage_error("--preset", "expects fast, balanced or thorough, got '" + *p + "'");
    out.settings.preset = *preset;
  }
  auto width = args.get_int("width", 64, 8192);
  if (!width) return width.error();
  if (*width) out.settings.working_long_side = **width;
  auto threads = args.get_int("threads", 1, 256);
  if (!threads) return threads.error();
  if (*threads) out.settings.threads = **threads;
  auto fps = args.get_double("fps", 0.1, 1000);
  if (!fps) return fps.error();
  out.settings.folder_fps = *fps;
  return out;
}

AnalysisSettings settings_from_report(const Report& report) { return settings_from_json(report.settings); }

Status write_reports(const Report& report, const std::string& base, bool html, const ReportExtras& extras) {
  auto json = write_json_report(report, base + ".json");
  if (!json || !html) return json;
  const AnalysisSettings settings = extras.settings ? *extras.settings : settings_from_report(report);
  return write_html_report(report, base + ".html", settings, extras.html, extras.thumbnails);
}

}  // namespace clipwarden::cli
