// Policies: how per-frame series become segments, and how a report becomes
// a verdict (pass | review | reject). A built-in default policy is
// documented in the README; a JSON policy file overrides any part of it.
#pragma once

#include <map>
#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "clipwarden/error.h"
#include "clipwarden/report.h"

namespace clipwarden {

// Turning one metric's per-frame series into segments (analyzer/segments).
// A segment opens where the value reaches `enter` and closes where it falls
// below `leave` (hysteresis). The effective enter level is raised to the
// clip's own baseline, median + baseline_k * 1.4826 * MAD, when that is
// higher, so a busy clip is judged against itself (baseline_k = 0 turns the
// baseline off); the baseline never lifts enter above reject_peak, so a clip
// that stays past the reject level is flagged throughout. Segments shorter than min_frames are dropped; segments
// separated by at most merge_gap_frames are joined. Severity comes from the
// peak: >= reject_peak is reject, >= review_peak is review, else info. An
// infinite peak level means that severity is never given from the peak
// (written as null in policy JSON).
struct SegmentRule {
  double enter = 0;
  double leave = 0;
  int min_frames = 1;
  int merge_gap_frames = 0;
  double baseline_k = 0;
  double review_peak = 0;
  double reject_peak = 0;
};

// A threshold on one clip-level statistic of one metric. statistic is one of
// mean, p50, p95, max (of the per-frame series), segment_count,
// longest_segment_s, segment_total_s (over the metric's segments, inclusive
// of the last frame's interval), or "details.<key>" for a number under
// summary.<metric>.details (a dotted key reaches into nested objects).
struct SummaryRule {
  std::string metric;
  std::string statistic;
  std::optional<double> review;  // value >= review -> at least review
  std::optional<double> reject;  // value >= reject -> reject
};

struct Policy {
  std::string name = "default";
  std::map<std::string, SegmentRule> segments;  // by metric
  std::vector<SummaryRule> rules;
  // Hard rules, checked on every clip.
  bool flash_hazard_rejects = true;  // > 3 flashes in a one-second window (WCAG 2.x)
  std::optional<double> stream_mismatch_review_s = 1.0;  // |audio - video| duration reviews
  std::optional<double> coherence_review_below;          // coherence score floor
  std::optional<double> coherence_reject_below;
  std::optional<int> dropped_frames_review;  // stream.dropped_frames at or above this reviews
  // Reviews a clip whose decoder reported warnings (corrupt data concealed):
  // any decoder complaint in summary.stream (decode_errors, concealed_frames,
  // lost_frames above 0).
  // (A clip whose decoding stops before its end is an input error instead.)
  bool decode_warnings_review = true;
};

// Every statistic name a SummaryRule may use besides "details.<key>".
const std::vector<std::string>& policy_statistics();

const Policy& default_policy();

// Reads a policy file (format in docs/gate.md). Keys not given keep the
// default: objects merge key by key, any other value replaces, null turns a
// rule off. Unknown keys, wrong types and impossible thresholds (review above
// reject, leave above enter, negative values) are usage errors whose subject
// names the file and the key path, e.g. "p.json: metrics.flicker.segment.enter".
Expected<Policy> load_policy(const std::string& path);
Expected<Policy> parse_policy(const std::string& json_text, const std::string& subject);
// The whole policy as JSON that parse_policy accepts back unchanged, keys in
// reading order (schema, name, rules, metrics).
nlohmann::ordered_json policy_to_json(const Policy& policy);

// The verdict of a finished report under a policy, with reasons that name
// the metric, the value, the threshold and the time range.
VerdictResult evaluate_policy(const Report& report, const Policy& policy);

// The value of the statistic a summary rule reads from a report, as
// evaluate_policy reads it; nothing when the report lacks the metric.
std::optional<double> rule_statistic(const Report& report, const SummaryRule& rule);

}  // namespace clipwarden
