// clipwarden_accuracy_eval: the full accuracy evaluation (docs/accuracy.md).
// Builds the evaluation set (defects injected at weak / moderate / strong
// strength into opencv-doc footage and FFmpeg lavfi sources), analyses it,
// and prints the per-class table. With --sweep it also prints, per metric,
// how the detector's raw response on each class compares with clean real
// footage, and how recall, precision and false alarms move when the
// metric's thresholds are scaled: the evidence for the default policy.
//
//   clipwarden_accuracy_eval [--work DIR] [--width N] [--frames N]
//       [--levels weak,moderate,strong] [--placements N] [--bases a,b]
//       [--classes a,b] [--seed N] [--json FILE] [--markdown FILE] [--sweep]
//       [--reports DIR]   (also write every analysed report to DIR)
//       [--preset fast|balanced|thorough]   (flow effort; default balanced)
//       [--corpus DIR]     (real-footage corpus with MANIFEST.tsv; default
//                           $CLIPWARDEN_CORPUS or shared/corpus beside the
//                           checkout when present: verdicts of its clips)
//       [--corpus-only]    (the corpus part alone, no injected set)
//       [--injected-only]  (the injected set alone; the corpus still gives
//                           model outputs as bases, and camera clean
//                           footage is then only the clean camera bases)
//   --bases takes names (vtest, gen_svd, ...) or kinds (camera, synthetic,
//   generated); with the corpus present, its model outputs are bases too.
//   After the class table: operating points per class (rules scaled, recall
//   and precision per kind of base against segments above info per minute
//   on the corpus's camera clips).
//       [--calibrate]      (derive the natural levels of
//                           analyzer/metrics/natural_levels.cpp from the
//                           corpus's camera clips and print them)
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <iostream>
#include <map>
#include <sstream>
#include <string>

#include "support/accuracy_run.h"
#include "support/corpus_run.h"
#include "support/natural_calibration.h"
#include "support/operating_points.h"

using namespace clipwarden;
using namespace clipwarden::accuracy;
using inject::DefectClass;
using inject::StrengthLevel;

namespace {

std::vector<std::string> split(const std::string& text) {
  std::vector<std::string> out;
  std::stringstream in(text);
  for (std::string item; std::getline(in, item, ',');)
    if (!item.empty()) out.push_back(item);
  return out;
}

[[noreturn]] void usage(const std::string& why) {
  std::fprintf(stderr, "clipwarden_accuracy_eval: %s\n(see the comment at the top of tests/bench/accuracy_eval.cpp)\n",
               why.c_str());
  std::exit(2);
}

struct CorpusOptions {
  std::string dir;
  bool only = false;
  bool calibrate = false;
  bool injected_only = false;
};

EvalOptions parse(int argc, char** argv, std::string& json_path, std::string& md_path, bool& sweep,
                  CorpusOptions& corpus) {
  EvalOptions o;
  o.set.work_dir = "/tmp/clipwarden-accuracy";
  o.set.long_side = 512;
  o.set.max_frames = 150;
  o.levels = {StrengthLevel::weak, StrengthLevel::moderate, StrengthLevel::strong};
  o.placements = 2;
  for (int i = 1; i < argc; ++i) {
    const std::string a = argv[i];
    auto value = [&]() -> std::string {
      if (i + 1 >= argc) usage(a + " needs a value");
      return argv[++i];
    };
    if (a == "--work") o.set.work_dir = value();
    else if (a == "--width") o.set.long_side = std::atoi(value().c_str());
    else if (a == "--frames") o.set.max_frames = std::atoi(value().c_str());
    else if (a == "--placements") o.placements = std::atoi(value().c_str());
    else if (a == "--seed") o.seed = std::strtoull(value().c_str(), nullptr, 10);
    else if (a == "--bases") o.set.base_names = split(value());
    else if (a == "--json") json_path = value();
    else if (a == "--markdown") md_path = value();
    else if (a == "--sweep") sweep = true;
    else if (a == "--reports") o.reports_dir = value();
    else if (a == "--corpus") corpus.dir = value();
    else if (a == "--corpus-only") corpus.only = true;
    else if (a == "--injected-only") corpus.injected_only = true;
    else if (a == "--calibrate") corpus.calibrate = true;
    else if (a == "--preset") {
      auto preset = preset_from_string(value());
      if (!preset) usage("--preset is fast, balanced or thorough");
      o.analysis.preset = *preset;
    }
    else if (a == "--levels") {
      o.levels.clear();
      for (const auto& l : split(value())) {
        if (l == "weak") o.levels.push_back(StrengthLevel::weak);
        else if (l == "moderate") o.levels.push_back(StrengthLevel::moderate);
        else if (l == "strong") o.levels.push_back(StrengthLevel::strong);
        else usage("unknown level '" + l + "'");
      }
    } else if (a == "--classes") {
      o.classes.clear();
      for (const auto& c : split(value())) {
        auto cls = inject::defect_class_from_string(c);
        if (!cls) usage("unknown class '" + c + "'");
        o.classes.push_back(*cls);
      }
    } else {
      usage("unknown argument '" + a + "'");
    }
  }
  if (o.set.long_side < 64 || o.set.max_frames < 40 || o.placements < 1) usage("--width >= 64, --frames >= 40, --placements >= 1");
  return o;
}

double quantile(std::vector<double> v, double q) {
  if (v.empty()) return NAN;
  std::sort(v.begin(), v.end());
  return v[static_cast<size_t>(std::lround(q * static_cast<double>(v.size() - 1)))];
}

// Per metric: the raw response (series peak inside the expected span) per
// class and level, beside clean real footage's p99 and max.
void print_responses(const EvalRun& run) {
  std::map<std::string, std::vector<double>> clean_values;
  for (const auto& c : run.clean)
    if (c.real && c.report)
      for (const auto& s : c.report->series)
        for (double v : s.values)
          if (is_defined(v)) clean_values[s.metric].push_back(v);
  std::printf("\n## Raw responses (series peak inside the expected span)\n\n");
  std::printf("| metric | class | level | n | min | median | clean real p99 | clean real max |\n|---|---|---|---|---|---|---|---|\n");
  for (DefectClass cls : inject::all_defect_classes())
    for (const auto& metric : metrics_for(cls))
      for (StrengthLevel level : {StrengthLevel::weak, StrengthLevel::moderate, StrengthLevel::strong}) {
        std::vector<double> peaks;
        for (const auto& c : run.cases) {
          if (c.cls != cls || c.level != level || !c.report) continue;
          const MetricSeries* s = c.report->find_series(metric);
          if (!s) continue;
          const FrameSpan span = expected_span(cls, c.truth_defect, *c.report);
          double peak = -INFINITY;
          for (int64_t f = std::max<int64_t>(0, span.start - kMatchToleranceFrames);
               f <= std::min<int64_t>(static_cast<int64_t>(s->values.size()) - 1, span.end + kMatchToleranceFrames); ++f)
            if (is_defined(s->values[f])) peak = std::max(peak, s->values[f]);
          if (std::isfinite(peak)) peaks.push_back(peak);
        }
        if (peaks.empty()) continue;
        const auto& cv = clean_values[metric];
        std::printf("| %s | %s | %s | %zu | %.4g | %.4g | %.4g | %.4g |\n", metric.c_str(), inject::to_string(cls),
                    inject::to_string(level), peaks.size(), quantile(peaks, 0), quantile(peaks, 0.5),
                    quantile(cv, 0.99), quantile(cv, 1.0));
      }
}

// Scales one metric's SegmentRule levels by each factor and rescores.
void print_sweep(const EvalRun& run, const Policy& base) {
  std::printf("\n## Threshold sweep (rule levels x factor; moderate strength)\n\n");
  std::printf("| metric | factor | enter | recall (classes) | precision | clean real segments | real rejects |\n|---|---|---|---|---|---|---|\n");
  for (const auto& [metric, rule] : base.segments) {
    std::vector<DefectClass> classes;
    for (DefectClass cls : inject::all_defect_classes()) {
      const auto& ms = metrics_for(cls);
      if (std::find(ms.begin(), ms.end(), metric) != ms.end()) classes.push_back(cls);
    }
    for (double factor : {0.25, 0.35, 0.5, 0.7, 1.0, 1.4, 2.0, 2.8, 4.0}) {
      Policy p = base;
      SegmentRule& r = p.segments[metric];
      r.enter *= factor;
      r.leave *= factor;
      r.review_peak *= factor;
      r.reject_peak *= factor;
      const Scoreboard board = score_all(run.cases, run.clean, p);
      std::string recall, precision;
      for (DefectClass cls : classes)
        if (const ClassLevelRow* row = board.find(cls, StrengthLevel::moderate)) {
          char buf[96];
          std::snprintf(buf, sizeof buf, "%s%s %.2f", recall.empty() ? "" : ", ", inject::to_string(cls), row->recall);
          recall += buf;
          std::snprintf(buf, sizeof buf, "%s%s", precision.empty() ? "" : ", ",
                        row->precision ? std::to_string(*row->precision).substr(0, 4).c_str() : "-");
          precision += buf;
        }
      int clean_segments = 0;
      for (const auto& c : board.clean)
        if (c.real && c.segments.count(metric)) clean_segments += c.segments.at(metric);
      std::printf("| %s | %.2f | %.4g | %s | %s | %d | %d |\n", metric.c_str(), factor, r.enter, recall.c_str(),
                  precision.c_str(), clean_segments, board.real_rejects);
    }
  }
}

}  // namespace

int main(int argc, char** argv) {
  std::string json_path, md_path;
  bool sweep = false;
  CorpusOptions corpus_options;
  EvalOptions options = parse(argc, argv, json_path, md_path, sweep, corpus_options);
  options.set.log = [](const std::string& line) { std::fprintf(stderr, "%s\n", line.c_str()); };
  const auto corpus_dir = corpus::find_corpus(corpus_options.dir);
  if (corpus_dir) options.set.corpus_dir = *corpus_dir;
  std::vector<corpus::CorpusResult> results;  // kept for the operating points
  if (corpus_dir && !corpus_options.injected_only) {
    auto clips = corpus::read_manifest(*corpus_dir);
    if (!clips) {
      std::fprintf(stderr, "clipwarden_accuracy_eval: %s\n", clips.error().message().c_str());
      return 3;
    }
    AnalysisSettings settings = options.analysis;
    settings.working_long_side = options.set.long_side;
    results = corpus::analyse_corpus(*clips, "", settings, options.policy, options.set.log);
    std::printf("## Real-footage corpus\n%s", corpus::corpus_markdown(results).c_str());
    if (corpus_options.calibrate) {
      std::vector<const Report*> camera;
      for (const auto& r : results)
        if (r.clip.camera && r.report) camera.push_back(&*r.report);
      const auto bins = calibration::derive_natural_levels(camera);
      std::printf("\n## Natural levels from %zu camera clips\n\n%s\nRows for natural_levels.cpp:\n%s"
                  "Largest relative difference from the kept table: %.3f\n",
                  camera.size(), calibration::natural_levels_markdown(bins).c_str(),
                  calibration::natural_levels_cpp(bins).c_str(),
                  calibration::largest_relative_difference(bins, natural_bins()));
    }
  } else if (corpus_dir) {
    // --injected-only: the corpus tables are left out on purpose.
  } else if (!corpus_options.dir.empty()) {
    usage("no MANIFEST.tsv in " + corpus_options.dir);
  } else if (corpus_options.calibrate) {
    usage("--calibrate needs the corpus (--corpus DIR)");
  } else {
    std::fprintf(stderr, "clipwarden_accuracy_eval: no corpus found (--corpus DIR): corpus tables left out\n");
  }
  if (corpus_options.only) return 0;
  auto run = run_evaluation(options);
  if (!run) {
    std::fprintf(stderr, "clipwarden_accuracy_eval: %s\n", run.error().message().c_str());
    return 3;
  }
  const Scoreboard board = score_all(run->cases, run->clean, options.policy);
  std::printf("%s", board.markdown().c_str());
  std::printf("\n%zu injected clips, %zu clean clips, %.0f s\n", run->cases.size(), run->clean.size(), run->seconds);
  // Clean camera footage for the operating points: the corpus's camera
  // clips when they were analysed, else the clean camera bases.
  std::vector<CleanFootage> camera;
  for (const auto& r : results)
    if (r.clip.camera && r.report) camera.push_back({&*r.report, r.report->clip.duration_s / 60});
  if (camera.empty())
    for (const auto& c : run->clean)
      if (c.real && c.report) camera.push_back({&*c.report, c.report->clip.duration_s / 60});
  for (StrengthLevel level : options.levels)
    std::printf("\n## Operating points, %s strength (%zu camera clips)\n\n%s", inject::to_string(level),
                camera.size(), operating_points_markdown(run->cases, run->clean, camera, options.policy, level).c_str());
  if (sweep) {
    print_responses(*run);
    print_sweep(*run, options.policy);
  }
  if (!md_path.empty()) std::ofstream(md_path) << board.markdown();
  if (!json_path.empty()) std::ofstream(json_path) << board.to_json().dump(1) << "\n";
  return 0;
}
