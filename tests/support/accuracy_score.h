// Scoring the accuracy evaluation: found segments against injected truth.
// Per defect class, strength and kind of base (camera, synthetic, generated): recall, precision, segment IoU and onset
// error in frames; per clean clip: segments per minute and the verdict.
// Segments can be re-derived from the kept per-frame series under another
// policy, so threshold choices are compared without re-analysing.
#pragma once

#include <map>
#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "analyzer/inject/defect_spec.h"
#include "clipwarden/policy.h"
#include "clipwarden/report.h"

namespace clipwarden::accuracy {

// The columns whose segments should catch a class: those whose descriptor
// lists the class in `catches` (analyzer/metrics/*_metric.cpp), in registry
// order; a drop is also found by the stream's dropped_frames. Empty for a
// class no column declares (the registry test requires one for each).
const std::vector<std::string>& metrics_for(inject::DefectClass cls);

// Frames of one clip where a class's detection is expected: the truth range,
// except cut (its first frame), drop (the frame after the gap), jerk (the
// displaced frame and the next) and the drift classes, whose linear ramps
// are expected from the frame where the change becomes visible (ΔE00 3,
// 5% size, a quarter blended away) to the end of the range.
struct FrameSpan {
  int64_t start = 0, end = 0;
};
FrameSpan expected_span(inject::DefectClass cls, const nlohmann::json& truth_defect, int64_t frame_count);
// The same span in the report's frames. A file that stores pictures on a
// cadence is analysed at its pictures (summary.details.cadence lists the
// stored frame of each analysed one), while the truth counts stored
// frames: the span is mapped to the analysed frames that lie in it (the
// nearest one after it when none does).
FrameSpan expected_span(inject::DefectClass cls, const nlohmann::json& truth_defect, const Report& report);

// A detection may start or end this many frames outside the span.
inline constexpr int kMatchToleranceFrames = 2;

struct AnalyzedCase {
  std::string id, base;
  std::string kind = "camera";  // the base's kind (accuracy_set.h, base_kind)
  inject::DefectClass cls = inject::DefectClass::flicker;
  inject::StrengthLevel level = inject::StrengthLevel::moderate;
  nlohmann::json truth_defect;  // the truth file's entry
  std::optional<Report> report;  // none when injection or analysis failed
  std::string error;
};

struct AnalyzedClean {
  std::string name;
  bool real = true;
  std::optional<Report> report;
  std::string error;
};

// The report's segments under `policy`: series with a rule are segmented
// again; segments a metric made itself (no series of that name) are kept.
std::vector<Segment> segments_under(const Report& report, const Policy& policy);

struct CaseScore {
  bool available = false;  // the class's detector ran (its series exists)
  bool detected = false;
  double iou = 0;                   // matched segments vs the span, frames
  std::optional<int64_t> onset;     // first matched start - span start
  int matched_segments = 0, false_segments = 0;
  std::vector<std::string> other_metrics;  // other metrics with a segment on the span
  Verdict verdict = Verdict::pass;
};
// `base_dropped_frames`: the clean base clip's own count, so a drop is
// found when the injected clip has more (real footage may have gaps).
CaseScore score_case(const AnalyzedCase& c, const Policy& policy, int base_dropped_frames = 0);

struct ClassLevelRow {
  inject::DefectClass cls = inject::DefectClass::flicker;
  inject::StrengthLevel level = inject::StrengthLevel::moderate;
  std::string kind = "camera";  // the bases' kind: camera, synthetic or generated
  int cases = 0, scored = 0, detected = 0;
  bool available = false;
  double recall = 0;
  std::optional<double> precision;  // none when nothing was found
  double mean_iou = 0;
  std::optional<double> median_abs_onset;
  std::optional<int64_t> max_abs_onset;
  int flagged = 0;  // verdict review or reject
  std::map<std::string, int> other_metrics;  // how many cases each other metric also fired on
};

struct CleanRow {
  std::string name;
  bool real = true;
  double minutes = 0;
  std::map<std::string, int> segments;  // by metric
  int dropped_frames = 0;
  Verdict verdict = Verdict::pass;
  std::vector<std::string> reasons;
};

struct Scoreboard {
  std::vector<ClassLevelRow> rows;
  std::vector<CleanRow> clean;
  std::map<std::string, double> real_false_alarms_per_minute;  // by metric
  double real_minutes = 0;
  int real_rejects = 0, real_reviews = 0;

  const ClassLevelRow* find(inject::DefectClass cls, inject::StrengthLevel level,
                            const std::string& kind = "camera") const;
  nlohmann::json to_json() const;
  std::string markdown() const;
};

Scoreboard score_all(const std::vector<AnalyzedCase>& cases, const std::vector<AnalyzedClean>& clean,
                     const Policy& policy);

}  // namespace clipwarden::accuracy
