#include "support/accuracy_run.h"

#include <algorithm>
#include <chrono>
#include <filesystem>

#include "clipwarden/report_io.h"

namespace clipwarden::accuracy {

Expected<EvalRun> run_evaluation(const EvalOptions& options) {
  const auto started = std::chrono::steady_clock::now();
  auto say = [&](const std::string& line) {
    if (options.set.log) options.set.log(line);
  };
  EvalRun run;
  auto keep = [&](const std::string& id, const Report& report) {
    if (options.reports_dir.empty()) return;
    std::string name = id;
    std::replace(name.begin(), name.end(), '/', '_');
    std::filesystem::create_directories(options.reports_dir);
    (void)write_json_report(report, options.reports_dir + "/" + name + ".json");
  };
  auto bases = prepare_base_clips(options.set);
  if (!bases) return bases.error();
  run.bases = std::move(*bases);
  AnalysisSettings settings = options.analysis;
  settings.working_long_side = options.set.long_side;

  for (const auto& b : run.bases) {
    AnalyzedClean clean{b.source.name, b.source.real};
    auto report = analyze_clip(b.path, settings, options.policy);
    if (report) keep("clean_" + b.source.name, *report), clean.report = std::move(*report);
    else clean.error = report.error().message();
    run.clean.push_back(std::move(clean));
  }
  const auto plan = plan_cases(run.bases, options.classes, options.levels, options.placements, options.seed,
                               options.set.work_dir);
  for (size_t i = 0; i < plan.size(); ++i) {
    const PlannedCase& p = plan[i];
    AnalyzedCase c{p.id, p.base->source.name, base_kind(p.base->source), p.cls, p.level};
    auto truth = inject_case(p);
    if (!truth) {
      c.error = "inject: " + truth.error().message();
    } else {
      c.truth_defect = (*truth)["defects"][0];
      auto report = analyze_clip((*truth)["output"]["path"], settings, options.policy);
      if (report) keep(p.id, *report), c.report = std::move(*report);
      else c.error = "analyze: " + report.error().message();
    }
    say("[" + std::to_string(i + 1) + "/" + std::to_string(plan.size()) + "] " + p.id + " " + p.spec +
        (c.error.empty() ? "" : "  FAILED: " + c.error));
    run.cases.push_back(std::move(c));
  }
  run.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count();
  return run;
}

}  // namespace clipwarden::accuracy
