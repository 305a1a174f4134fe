#include "support/operating_points.h"

#include <algorithm>
#include <cstdio>

namespace clipwarden::accuracy {
using inject::DefectClass;

const std::vector<double>& operating_factors() {
  static const std::vector<double> factors = {0.5, 0.7, 1.0, 1.4, 2.0};
  return factors;
}

namespace {

// `policy` with every segment rule of `metrics` scaled by `factor`.
Policy scaled(const Policy& policy, const std::vector<std::string>& metrics, double factor) {
  Policy p = policy;
  for (const auto& m : metrics) {
    const auto it = p.segments.find(m);
    if (it == p.segments.end()) continue;
    SegmentRule& r = it->second;
    r.enter *= factor;
    r.leave *= factor;
    r.review_peak *= factor;
    r.reject_peak *= factor;
  }
  return p;
}

std::string fixed(double v, int digits = 2) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.*f", digits, v);
  return buf;
}

}  // namespace

std::string operating_points_markdown(const std::vector<AnalyzedCase>& cases,
                                      const std::vector<AnalyzedClean>& clean_bases,
                                      const std::vector<CleanFootage>& camera, const Policy& policy,
                                      inject::StrengthLevel level) {
  double minutes = 0;
  for (const auto& c : camera) minutes += c.minutes;
  // The kinds of base that have cases at this level, one column each.
  std::vector<std::string> kinds;
  for (const char* kind : {"camera", "synthetic", "generated"})
    if (std::any_of(cases.begin(), cases.end(), [&](const AnalyzedCase& c) { return c.kind == kind && c.level == level; }))
      kinds.push_back(kind);
  std::string md = "| class | caught by | factor";
  for (const auto& k : kinds) md += " | " + k + " bases: recall / precision (cases)";
  md += " | camera footage: segments above info / min | camera clips with one |\n|---|---|---";
  for (size_t i = 0; i < kinds.size(); ++i) md += "|---";
  md += "|---|---|\n";
  for (DefectClass cls : inject::all_defect_classes()) {
    // A drop is found by the stream's clip-level count, which no factor moves.
    if (cls == DefectClass::drop) continue;
    const auto& metrics = metrics_for(cls);
    const bool judged = std::any_of(metrics.begin(), metrics.end(),
                                    [&](const std::string& m) { return policy.segments.count(m) > 0; });
    if (!judged) continue;
    std::string caught_by;
    for (const auto& m : metrics) caught_by += (caught_by.empty() ? "" : ", ") + m;
    for (double factor : operating_factors()) {
      const Policy p = scaled(policy, metrics, factor);
      // The false-alarm side: the same rules on clean camera footage.
      int segments = 0, clips = 0;
      for (const auto& c : camera) {
        int here = 0;
        for (const auto& s : segments_under(*c.report, p))
          if (s.severity != Severity::info && std::count(metrics.begin(), metrics.end(), s.metric)) ++here;
        segments += here;
        clips += here > 0;
      }
      const Scoreboard board = score_all(cases, clean_bases, p);
      std::string cells;
      bool any = false;
      for (const auto& kind : kinds) {
        const ClassLevelRow* row = board.find(cls, level, kind);
        any = any || row;
        cells += " | " + (row ? fixed(row->recall) + " / " + (row->precision ? fixed(*row->precision) : "–") + " (" +
                                    std::to_string(row->scored) + ")"
                              : "–");
      }
      if (!any) continue;
      md += "| " + std::string(inject::to_string(cls)) + " | " + caught_by + " | " + fixed(factor) + cells + " | " +
            (minutes > 0 ? fixed(segments / minutes) : "–") + " | " + std::to_string(clips) + "/" +
            std::to_string(camera.size()) + " |\n";
    }
  }
  return md;
}

}  // namespace clipwarden::accuracy
