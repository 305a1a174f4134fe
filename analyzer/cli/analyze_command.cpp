// clipwarden analyze CLIP... : one JSON (and HTML) report per clip.
#include <cstdio>
#include <filesystem>
#include <thread>

#include "analyzer/cli/args.h"
#include "analyzer/cli/command.h"
#include "analyzer/cli/output_names.h"
#include "analyzer/cli/progress.h"
#include "analyzer/cli/settings_args.h"
#include "analyzer/inspect/page_pictures.h"
#include "clipwarden/analysis.h"
#include "clipwarden/report_io.h"

namespace clipwarden::cli {

int run_analyze(const std::vector<std::string>& args) {
  std::vector<OptionSpec> specs = analysis_option_specs();
  specs.push_back({"out", true, "output folder (default clipwarden-out)"});
  specs.push_back({"no-html", false, "write only the JSON report"});
  specs.push_back({"quiet", false, "no progress on stderr"});
  int stop_status = kExitOk;
  auto parsed = parse_command_line(
      args, specs,
      {"analyze", "CLIP... [options]",
       "Analyzes each clip and writes DIR/<name>.json and DIR/<name>.html.\n"
       "Exit status: 0 all passed the gate, 1 a clip was rejected, 2 bad usage,\n"
       "3 a clip could not be read (the others are still analyzed)."},
      stop_status);
  if (!parsed) return stop_status;
  if (parsed->positionals.empty()) {
    print_error("analyze needs at least one CLIP (see clipwarden analyze --help)");
    return kExitUsage;
  }
  auto options = analysis_options_from_args(*parsed);
  if (!options) {
    print_error(options.error().message());
    return kExitUsage;
  }
  const std::string out_dir = parsed->get("out").value_or("clipwarden-out");
  std::error_code ec;
  std::filesystem::create_directories(out_dir, ec);
  if (ec) {
    print_error(out_dir + ": cannot create output folder: " + ec.message());
    return kExitUsage;
  }
  const bool quiet = parsed->has("quiet");
  const bool html = !parsed->has("no-html");

  int status = kExitOk;
  OutputNamer namer;
  for (const auto& clip : parsed->positionals) {
    ProgressLine progress(clip, quiet || !stderr_is_terminal());
    AnalysisHooks hooks;
    hooks.on_progress = [&](int64_t done, int64_t expected) { progress.update(done, expected); };
    ThumbnailCollector thumbnails;  // a few small JPEGs for the page's strip
    if (html) hooks.on_frame = [&](const DecodedFrame& frame) { thumbnails.add(frame); };
    auto report = analyze_clip(clip, options->settings, options->policy, hooks);
    progress.finish();
    if (!report) {
      print_error(report.error().message());
      status = kExitInputError;
      continue;
    }
    const std::string base = (std::filesystem::path(out_dir) / namer.unique_name(clip)).string();
    ReportExtras extras;
    extras.settings = &options->settings;
    extras.thumbnails = &thumbnails.thumbnails();
    auto written = write_reports(*report, base, html, extras);
    if (!written) {
      print_error(written.error().message());
      status = kExitInputError;
      continue;
    }
    if (!quiet)
      std::printf("%s: %s (coherence %.1f) -> %s.json%s\n", clip.c_str(),
                  to_string(report->verdict.status), report->summary.coherence, base.c_str(),
                  html ? (", " + base + ".html").c_str() : "");
    if (report->verdict.status == Verdict::reject && status == kExitOk) status = kExitGateFailed;
  }
  return status;
}

}  // namespace clipwarden::cli
