#include "support/accuracy_score.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <set>

#include "analyzer/metrics/metric_descriptor.h"
#include "analyzer/segments/segmenter.h"

namespace clipwarden::accuracy {
using inject::DefectClass;
using inject::StrengthLevel;

const std::vector<std::string>& metrics_for(DefectClass cls) {
  // From the descriptors: the columns that declare the class in `catches`,
  // in registry order.
  static const std::map<DefectClass, std::vector<std::string>> table = [] {
    std::map<DefectClass, std::vector<std::string>> out;
    for (const MetricDescriptor* m : metric_descriptors())
      for (const ColumnDescriptor& c : m->columns)
        for (const std::string& name : c.catches)
          if (auto parsed = inject::defect_class_from_string(name)) out[*parsed].push_back(c.name);
    return out;
  }();
  static const std::vector<std::string> none;
  const auto it = table.find(cls);
  return it == table.end() ? none : it->second;
}

namespace {

// The level at which a gradual change becomes visible (our choices, after
// common practice for colour): a CIEDE2000 of 3 is visible at a glance;
// a 5% change of size; a quarter of a region blended away.
double visible_level(DefectClass cls) {
  switch (cls) {
    case DefectClass::colour_drift: return 3.0;
    case DefectClass::shape_drift: return 0.05;
    case DefectClass::vanish: return 0.25;
    default: return 0;
  }
}

}  // namespace

FrameSpan expected_span(DefectClass cls, const nlohmann::json& truth_defect, int64_t frame_count) {
  const int64_t s = truth_defect["frames"][0], e = truth_defect["frames"][1];
  switch (cls) {
    case DefectClass::cut:
    case DefectClass::drop: return {s, s};
    case DefectClass::jerk: return {s, std::min(s + 1, frame_count - 1)};
    case DefectClass::colour_drift:
    case DefectClass::shape_drift:
    case DefectClass::vanish: {
      // The drift classes ramp linearly: strength x k/n at the k-th of the
      // n frames (docs/inject.md). Nothing can be seen before the change
      // is visible, so the span starts at the first frame where it is.
      const auto strength = truth_defect.find("strength");
      if (strength == truth_defect.end() || !strength->is_number()) return {s, e};
      const double n = static_cast<double>(e - s + 1);
      const double k = std::ceil(visible_level(cls) / strength->get<double>() * n);
      return {std::min(e, s + std::max<int64_t>(0, static_cast<int64_t>(k) - 1)), e};
    }
    default: return {s, e};
  }
}

FrameSpan expected_span(DefectClass cls, const nlohmann::json& truth_defect, const Report& report) {
  const auto cadence = report.summary.details.find("cadence");
  if (cadence == report.summary.details.end() || !cadence->contains("source_frames")) {
    return expected_span(cls, truth_defect, static_cast<int64_t>(report.frame_times_s.size()));
  }
  const std::vector<int64_t> sources = (*cadence)["source_frames"].get<std::vector<int64_t>>();
  const FrameSpan stored = expected_span(cls, truth_defect, (*cadence).value("stored_frames", int64_t{0}));
  // First analysed frame at or after the span's start; last at or before its end.
  const auto first = std::lower_bound(sources.begin(), sources.end(), stored.start);
  const auto past = std::upper_bound(sources.begin(), sources.end(), stored.end);
  const int64_t start = std::min<int64_t>(first - sources.begin(), static_cast<int64_t>(sources.size()) - 1);
  const int64_t end = std::max<int64_t>(start, (past - sources.begin()) - 1);
  return {start, end};
}

std::vector<Segment> segments_under(const Report& report, const Policy& policy) {
  std::vector<Segment> out;
  // Kept as the metric made them: segments of metrics with no series, and
  // of metrics the policy has no segment rule for (flash builds its hazard
  // segments itself, analyzer/metrics/flash_metric.cpp).
  for (const auto& s : report.segments)
    if (!report.find_series(s.metric) || !policy.segments.count(s.metric)) out.push_back(s);
  std::vector<Segment> found = segment_report(report, policy);
  out.insert(out.end(), found.begin(), found.end());
  return out;
}

namespace {

bool has_metric(const Report& r, const std::string& metric) {
  if (r.find_series(metric)) return true;
  return std::any_of(r.segments.begin(), r.segments.end(), [&](const Segment& s) { return s.metric == metric; });
}

bool overlaps(const Segment& s, const FrameSpan& span) {
  return s.end_frame >= span.start - kMatchToleranceFrames && s.start_frame <= span.end + kMatchToleranceFrames;
}

}  // namespace

CaseScore score_case(const AnalyzedCase& c, const Policy& policy, int base_dropped_frames) {
  CaseScore score;
  if (!c.report) return score;
  const Report& r = *c.report;
  const auto& metrics = metrics_for(c.cls);
  score.available = c.cls == DefectClass::drop ||
                    std::any_of(metrics.begin(), metrics.end(), [&](const auto& m) { return has_metric(r, m); });
  const std::vector<Segment> segments = segments_under(r, policy);
  Report judged = r;
  judged.segments = segments;
  score.verdict = evaluate_policy(judged, policy).status;

  const FrameSpan span = expected_span(c.cls, c.truth_defect, r);
  std::set<int64_t> found_frames;
  std::set<std::string> others;
  for (const auto& s : segments) {
    const bool ours = std::find(metrics.begin(), metrics.end(), s.metric) != metrics.end();
    if (!ours) {
      if (overlaps(s, span)) others.insert(s.metric);
      continue;
    }
    if (!overlaps(s, span)) {
      ++score.false_segments;
      continue;
    }
    ++score.matched_segments;
    const int64_t onset = s.start_frame - span.start;
    if (!score.onset || s.start_frame < span.start + *score.onset) score.onset = onset;
    for (int64_t f = s.start_frame; f <= s.end_frame; ++f) found_frames.insert(f);
  }
  score.detected = score.matched_segments > 0;
  if (c.cls == DefectClass::drop && r.summary.stream.dropped_frames > base_dropped_frames) score.detected = true;
  if (!found_frames.empty()) {
    int64_t inter = 0;
    for (int64_t f : found_frames) inter += f >= span.start && f <= span.end;
    const int64_t uni = static_cast<int64_t>(found_frames.size()) + (span.end - span.start + 1) - inter;
    score.iou = static_cast<double>(inter) / static_cast<double>(uni);
  }
  score.other_metrics.assign(others.begin(), others.end());
  return score;
}

namespace {

double median(std::vector<double> v) {
  std::sort(v.begin(), v.end());
  const size_t n = v.size();
  return n % 2 ? v[n / 2] : (v[n / 2 - 1] + v[n / 2]) / 2;
}

// Frames the clean base clips already lack (real footage may have gaps).
using BaseDrops = std::map<std::string, int>;

int base_drops(const BaseDrops& drops, const std::string& base) {
  auto it = drops.find(base);
  return it == drops.end() ? 0 : it->second;
}

ClassLevelRow score_group(DefectClass cls, StrengthLevel level, const std::string& kind,
                          const std::vector<const AnalyzedCase*>& group, const std::vector<AnalyzedCase>& all,
                          const BaseDrops& drops, const Policy& policy) {
  ClassLevelRow row{cls, level, kind};
  row.cases = static_cast<int>(group.size());
  int matched = 0, false_segments = 0;
  double iou_sum = 0;
  std::vector<double> onsets;
  for (const AnalyzedCase* c : group) {
    const CaseScore s = score_case(*c, policy, base_drops(drops, c->base));
    if (!c->report) continue;
    ++row.scored;
    row.available = row.available || s.available;
    row.detected += s.detected;
    matched += s.matched_segments;
    false_segments += s.false_segments;
    if (s.detected) iou_sum += s.iou;
    if (s.onset) onsets.push_back(std::fabs(static_cast<double>(*s.onset)));
    row.flagged += s.verdict != Verdict::pass;
    for (const auto& m : s.other_metrics) ++row.other_metrics[m];
  }
  if (row.scored > 0) row.recall = static_cast<double>(row.detected) / row.scored;
  if (row.detected > 0) row.mean_iou = iou_sum / row.detected;
  if (!onsets.empty()) {
    row.median_abs_onset = median(onsets);
    row.max_abs_onset = static_cast<int64_t>(*std::max_element(onsets.begin(), onsets.end()));
  }
  if (cls == DefectClass::drop) {
    // A clip-level fact: of the injected clips on this kind of base whose
    // stream timing shows more missing frames than their clean base (this
    // level's drop cases and every case of another class), the share that
    // really lost frames.
    int flagged_clips = 0, true_clips = 0;
    for (const auto& c : all) {
      if (c.kind != kind) continue;
      const bool this_row = c.cls == DefectClass::drop && c.level == level;
      if (c.cls == DefectClass::drop && !this_row) continue;
      if (c.report && c.report->summary.stream.dropped_frames > base_drops(drops, c.base)) {
        ++flagged_clips;
        true_clips += this_row;
      }
    }
    if (flagged_clips > 0) row.precision = static_cast<double>(true_clips) / flagged_clips;
  } else if (matched + false_segments > 0) {
    row.precision = static_cast<double>(matched) / (matched + false_segments);
  }
  return row;
}

}  // namespace

Scoreboard score_all(const std::vector<AnalyzedCase>& cases, const std::vector<AnalyzedClean>& clean,
                     const Policy& policy) {
  Scoreboard board;
  BaseDrops drops;
  for (const auto& c : clean)
    if (c.report) drops[c.name] = c.report->summary.stream.dropped_frames;
  for (DefectClass cls : inject::all_defect_classes())
    for (StrengthLevel level : {StrengthLevel::weak, StrengthLevel::moderate, StrengthLevel::strong})
      for (const char* kind : {"camera", "synthetic", "generated"}) {
        std::vector<const AnalyzedCase*> group;
        for (const auto& c : cases)
          if (c.cls == cls && c.level == level && c.kind == kind) group.push_back(&c);
        if (!group.empty()) board.rows.push_back(score_group(cls, level, kind, group, cases, drops, policy));
      }
  for (const auto& c : clean) {
    CleanRow row{c.name, c.real};
    if (!c.report) {
      row.reasons.push_back("not analysed: " + c.error);
      board.clean.push_back(row);
      continue;
    }
    const Report& r = *c.report;
    row.minutes = r.clip.duration_s / 60.0;
    Report judged = r;
    judged.segments = segments_under(r, policy);
    for (const auto& s : judged.segments) ++row.segments[s.metric];
    row.dropped_frames = r.summary.stream.dropped_frames;
    const VerdictResult verdict = evaluate_policy(judged, policy);
    row.verdict = verdict.status;
    row.reasons = verdict.reasons;
    if (c.real) {
      board.real_minutes += row.minutes;
      board.real_rejects += row.verdict == Verdict::reject;
      board.real_reviews += row.verdict == Verdict::review;
      for (const auto& [metric, n] : row.segments) board.real_false_alarms_per_minute[metric] += n;
    }
    board.clean.push_back(row);
  }
  if (board.real_minutes > 0)
    for (auto& [metric, n] : board.real_false_alarms_per_minute) n /= board.real_minutes;
  return board;
}

const ClassLevelRow* Scoreboard::find(DefectClass cls, StrengthLevel level, const std::string& kind) const {
  for (const auto& r : rows)
    if (r.cls == cls && r.level == level && r.kind == kind) return &r;
  return nullptr;
}

nlohmann::json Scoreboard::to_json() const {
  nlohmann::json j;
  j["classes"] = nlohmann::json::array();
  for (const auto& r : rows) {
    nlohmann::json row = {{"class", inject::to_string(r.cls)}, {"level", inject::to_string(r.level)},
                          {"bases", r.kind},
                          {"metrics", metrics_for(r.cls)}, {"available", r.available},
                          {"cases", r.cases}, {"scored", r.scored}, {"detected", r.detected},
                          {"recall", r.recall}, {"mean_iou", r.mean_iou}, {"flagged", r.flagged},
                          {"other_metrics", r.other_metrics}};
    row["precision"] = r.precision ? nlohmann::json(*r.precision) : nlohmann::json(nullptr);
    row["median_abs_onset_frames"] = r.median_abs_onset ? nlohmann::json(*r.median_abs_onset) : nlohmann::json();
    row["max_abs_onset_frames"] = r.max_abs_onset ? nlohmann::json(*r.max_abs_onset) : nlohmann::json();
    j["classes"].push_back(row);
  }
  j["clean"] = nlohmann::json::array();
  for (const auto& c : clean)
    j["clean"].push_back({{"clip", c.name}, {"real", c.real}, {"minutes", c.minutes}, {"segments", c.segments},
                          {"dropped_frames", c.dropped_frames}, {"verdict", to_string(c.verdict)},
                          {"reasons", c.reasons}});
  j["real_minutes"] = real_minutes;
  j["real_false_alarms_per_minute"] = real_false_alarms_per_minute;
  j["real_rejects"] = real_rejects;
  j["real_reviews"] = real_reviews;
  return j;
}

namespace {

std::string fixed(double v, int digits = 2) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.*f", digits, v);
  return buf;
}

}  // namespace

std::string Scoreboard::markdown() const {
  std::string md =
      "| class | caught by | strength | bases | cases | recall | precision | IoU | onset median / max (frames) | "
      "verdict review+ | other metrics firing |\n|---|---|---|---|---|---|---|---|---|---|---|\n";
  for (const auto& r : rows) {
    std::string metrics;
    for (const auto& m : metrics_for(r.cls)) metrics += (metrics.empty() ? "" : ", ") + m;
    if (r.cls == DefectClass::drop) metrics = "stream.dropped_frames, jolt";
    md += "| " + std::string(inject::to_string(r.cls)) + " | " + metrics + " | " + inject::to_string(r.level) +
          " | " + r.kind + " | " + std::to_string(r.scored) + " | ";
    if (!r.available) {
      md += "detector not available | | | | | |\n";
      continue;
    }
    std::string others;
    for (const auto& [m, n] : r.other_metrics) others += (others.empty() ? "" : ", ") + m + " " + std::to_string(n);
    const bool clip_level = r.cls == DefectClass::drop;
    md += fixed(r.recall) + " | " + (r.precision ? fixed(*r.precision) : "–") + " | " +
          (clip_level || r.detected == 0 ? "–" : fixed(r.mean_iou)) + " | " +
          (r.median_abs_onset ? fixed(*r.median_abs_onset, 1) + " / " + std::to_string(*r.max_abs_onset) : "–") +
          " | " + std::to_string(r.flagged) + "/" + std::to_string(r.scored) + " | " + others + " |\n";
  }
  md += "\n| clean clip | real | minutes | segments | verdict |\n|---|---|---|---|---|\n";
  for (const auto& c : clean) {
    std::string segs;
    for (const auto& [m, n] : c.segments) segs += (segs.empty() ? "" : ", ") + m + " " + std::to_string(n);
    md += "| " + c.name + " | " + (c.real ? "yes" : "no") + " | " + fixed(c.minutes) + " | " +
          (segs.empty() ? "none" : segs) + " | " + to_string(c.verdict) + " |\n";
  }
  md += "\nFalse alarms on untouched real footage (" + fixed(real_minutes) + " min): ";
  std::string fa;
  for (const auto& [m, n] : real_false_alarms_per_minute) fa += (fa.empty() ? "" : ", ") + m + " " + fixed(n) + "/min";
  md += (fa.empty() ? "none" : fa) + "; verdicts: " + std::to_string(real_rejects) + " reject, " +
        std::to_string(real_reviews) + " review.\n";
  return md;
}

}  // namespace clipwarden::accuracy
