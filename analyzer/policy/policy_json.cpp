// Policy <-> JSON ("clipwarden.policy/1", format in docs/gate.md).
//
// A policy file is read as a JSON merge patch (RFC 7396) over the default
// policy's JSON: objects merge key by key, other values replace, null
// removes (turns that rule off). The merged document is then read strictly:
// every key must be known, every value of the right type, every threshold
// possible. policy_to_json writes a removal (null) for each default rule the
// policy lacks, so any policy printed and read back is the same policy.
#include <algorithm>
#include <cmath>
#include <fstream>
#include <set>
#include <sstream>

#include "analyzer/core/json_text.h"
#include "clipwarden/policy.h"

namespace clipwarden {
namespace {

using nlohmann::json;
using nlohmann::ordered_json;

constexpr const char* kPolicySchema = "clipwarden.policy/1";

// Thrown only inside this file; parse_policy turns it into a usage Error.
struct BadKey {
  std::string path;
  std::string cause;
};

std::string fmt(double v) {
  std::ostringstream s;
  s << v;
  return s.str();
}

void only_keys(const json& obj, const std::string& path, const std::set<std::string>& allowed) {
  for (const auto& [key, value] : obj.items()) {
    if (allowed.count(key)) continue;
    std::string list;
    for (const auto& a : allowed) list += (list.empty() ? "" : ", ") + a;
    throw BadKey{path + key, "unknown key (expected one of: " + list + ")"};
  }
}

const json& object_at(const json& parent, const std::string& key, const std::string& path) {
  const json& v = parent.at(key);
  if (!v.is_object()) throw BadKey{path + key, "must be an object"};
  return v;
}

// A finite number >= 0, or nullopt when the key is absent (removed by null).
std::optional<double> opt_nonneg(const json& obj, const std::string& key, const std::string& path) {
  if (!obj.contains(key) || obj[key].is_null()) return std::nullopt;
  const json& v = obj[key];
  if (!v.is_number()) throw BadKey{path + key, "must be a number or null"};
  const double d = v.get<double>();
  if (!std::isfinite(d) || d < 0) throw BadKey{path + key, "must be 0 or more, got " + fmt(d)};
  return d;
}

double required_nonneg(const json& obj, const std::string& key, const std::string& path) {
  auto v = opt_nonneg(obj, key, path);
  if (!v) throw BadKey{path + key, "is required (a number, 0 or more)"};
  return *v;
}

int required_int(const json& obj, const std::string& key, const std::string& path, int min) {
  if (!obj.contains(key)) throw BadKey{path + key, "is required (a whole number)"};
  const json& v = obj[key];
  if (!v.is_number_integer()) throw BadKey{path + key, "must be a whole number"};
  const auto i = v.get<int64_t>();
  if (i < min || i > 1000000)
    throw BadKey{path + key,
                 "must be from " + std::to_string(min) + " to 1000000, got " + std::to_string(i)};
  return static_cast<int>(i);
}

bool required_bool(const json& obj, const std::string& key, const std::string& path) {
  if (!obj.contains(key) || !obj[key].is_boolean())
    throw BadKey{path + key, "must be true or false"};
  return obj[key].get<bool>();
}

void check_order(std::optional<double> low, std::optional<double> high, const std::string& low_key,
                 const std::string& high_name, const std::string& path) {
  if (low && high && *low > *high)
    throw BadKey{path + low_key, fmt(*low) + " is above " + high_name + " " + fmt(*high)};
}

bool valid_statistic(const std::string& s) {
  for (const auto& known : policy_statistics())
    if (s == known) return true;
  const std::string prefix = "details.";
  return s.size() > prefix.size() && s.compare(0, prefix.size(), prefix) == 0 && s.back() != '.';
}

SegmentRule read_segment(const json& j, const std::string& path) {
  only_keys(j, path,
            {"enter", "leave", "min_frames", "merge_gap_frames", "baseline_k", "review_peak",
             "reject_peak"});
  SegmentRule r;
  r.enter = required_nonneg(j, "enter", path);
  r.leave = required_nonneg(j, "leave", path);
  check_order(r.leave, r.enter, "leave", "enter", path);
  r.min_frames = required_int(j, "min_frames", path, 1);
  r.merge_gap_frames = required_int(j, "merge_gap_frames", path, 0);
  r.baseline_k = required_nonneg(j, "baseline_k", path);
  const auto review = opt_nonneg(j, "review_peak", path);
  const auto reject = opt_nonneg(j, "reject_peak", path);
  check_order(review, reject, "review_peak", "reject_peak", path);
  r.review_peak = review.value_or(std::numeric_limits<double>::infinity());
  r.reject_peak = reject.value_or(std::numeric_limits<double>::infinity());
  return r;
}

void read_metric(const std::string& metric, const json& j, const std::string& path, Policy& out) {
  only_keys(j, path, {"segment", "thresholds"});
  if (j.contains("segment") && !j["segment"].is_null())
    out.segments[metric] = read_segment(object_at(j, "segment", path), path + "segment.");
  if (!j.contains("thresholds") || j["thresholds"].is_null()) return;
  const std::string tpath = path + "thresholds.";
  for (const auto& [statistic, levels] : object_at(j, "thresholds", path).items()) {
    const std::string spath = tpath + statistic + ".";
    if (!valid_statistic(statistic)) {
      std::string list;
      for (const auto& s : policy_statistics()) list += s + ", ";
      throw BadKey{tpath + statistic,
                   "unknown statistic (expected one of: " + list + "details.<key>)"};
    }
    if (levels.is_null()) continue;
    if (!levels.is_object())
      throw BadKey{tpath + statistic, "must be an object {review, reject} or null"};
    only_keys(levels, spath, {"review", "reject"});
    SummaryRule rule{metric, statistic, opt_nonneg(levels, "review", spath),
                     opt_nonneg(levels, "reject", spath)};
    check_order(rule.review, rule.reject, "review", "reject", spath);
    if (rule.review || rule.reject) out.rules.push_back(std::move(rule));
  }
}

void read_rules(const json& j, Policy& out) {
  const std::string path = "rules.";
  only_keys(j, path,
            {"flash_hazard_rejects", "stream_mismatch_review_s", "coherence_review_below",
             "coherence_reject_below", "dropped_frames_review", "decode_warnings_review"});
  out.flash_hazard_rejects = required_bool(j, "flash_hazard_rejects", path);
  out.decode_warnings_review = required_bool(j, "decode_warnings_review", path);
  out.stream_mismatch_review_s = opt_nonneg(j, "stream_mismatch_review_s", path);
  out.coherence_review_below = opt_nonneg(j, "coherence_review_below", path);
  out.coherence_reject_below = opt_nonneg(j, "coherence_reject_below", path);
  for (const char* key : {"coherence_review_below", "coherence_reject_below"}) {
    auto v = opt_nonneg(j, key, path);
    if (v && *v > 100) throw BadKey{path + key, "must be from 0 to 100, got " + fmt(*v)};
  }
  // A floor: the reject floor must sit at or below the review floor.
  check_order(out.coherence_reject_below, out.coherence_review_below, "coherence_reject_below",
              "coherence_review_below", path);
  if (j.contains("dropped_frames_review") && !j["dropped_frames_review"].is_null())
    out.dropped_frames_review = required_int(j, "dropped_frames_review", path, 1);
}

Policy read_policy(const json& doc, const std::set<std::string>& known_metrics) {
  if (!doc.is_object()) throw BadKey{"", "a policy must be a JSON object"};
  only_keys(doc, "", {"schema", "name", "metrics", "rules"});
  Policy out;
  if (doc.contains("schema") && doc["schema"] != kPolicySchema)
    throw BadKey{"schema", std::string("must be \"") + kPolicySchema + "\""};
  if (doc.contains("name")) {
    if (!doc["name"].is_string()) throw BadKey{"name", "must be a string"};
    out.name = doc["name"].get<std::string>();
  }
  if (!doc.contains("rules")) throw BadKey{"rules", "is required"};
  read_rules(object_at(doc, "rules", ""), out);
  if (!doc.contains("metrics")) return out;
  for (const auto& [metric, entry] : object_at(doc, "metrics", "").items()) {
    if (!known_metrics.count(metric)) {
      std::string list;
      for (const auto& m : known_metrics) list += (list.empty() ? "" : ", ") + m;
      throw BadKey{"metrics." + metric, "unknown metric (known: " + list + ")"};
    }
    if (entry.is_null()) continue;
    if (!entry.is_object()) throw BadKey{"metrics." + metric, "must be an object or null"};
    read_metric(metric, entry, "metrics." + metric + ".", out);
  }
  return out;
}

// Written in reading order (ordered_json): what a person edits comes first.
ordered_json optional_json(const std::optional<double>& v) {
  return v ? ordered_json(*v) : ordered_json(nullptr);
}
ordered_json peak_json(double v) {
  return std::isfinite(v) ? ordered_json(v) : ordered_json(nullptr);
}

std::pair<size_t, std::string> statistic_rank(const std::string& statistic) {
  const auto& known = policy_statistics();
  const auto it = std::find(known.begin(), known.end(), statistic);
  return {static_cast<size_t>(it - known.begin()), statistic};
}

ordered_json metrics_json(const Policy& p) {
  ordered_json metrics = ordered_json::object();
  std::set<std::string> names;
  for (const auto& [metric, rule] : p.segments) names.insert(metric);
  for (const auto& rule : p.rules) names.insert(rule.metric);
  for (const auto& metric : names) {
    ordered_json entry = ordered_json::object();
    if (auto it = p.segments.find(metric); it != p.segments.end()) {
      const SegmentRule& r = it->second;
      entry["segment"] = {{"enter", r.enter},
                          {"leave", r.leave},
                          {"min_frames", r.min_frames},
                          {"merge_gap_frames", r.merge_gap_frames},
                          {"baseline_k", r.baseline_k},
                          {"review_peak", peak_json(r.review_peak)},
                          {"reject_peak", peak_json(r.reject_peak)}};
    }
    // Statistics in a fixed order (policy_statistics(), then details keys by
    // name) so printing does not depend on the order rules were added in.
    std::vector<const SummaryRule*> rules;
    for (const auto& rule : p.rules)
      if (rule.metric == metric) rules.push_back(&rule);
    std::stable_sort(rules.begin(), rules.end(), [](const SummaryRule* a, const SummaryRule* b) {
      return statistic_rank(a->statistic) < statistic_rank(b->statistic);
    });
    for (const SummaryRule* rule : rules)
      entry["thresholds"][rule->statistic] = {{"review", optional_json(rule->review)},
                                              {"reject", optional_json(rule->reject)}};
    metrics[metric] = std::move(entry);
  }
  return metrics;
}

// Nulls for every default rule `p` lacks, so the JSON read back (as a patch
// over the default) gives `p` again and not the default's rule.
void add_removals(ordered_json& metrics, const ordered_json& default_metrics) {
  for (const auto& [metric, entry] : default_metrics.items()) {
    if (!metrics.contains(metric)) {
      metrics[metric] = nullptr;
      continue;
    }
    ordered_json& mine = metrics[metric];
    if (entry.contains("segment") && !mine.contains("segment")) mine["segment"] = nullptr;
    if (!entry.contains("thresholds")) continue;
    for (const auto& [statistic, levels] : entry["thresholds"].items())
      if (!mine.contains("thresholds") || !mine["thresholds"].contains(statistic))
        mine["thresholds"][statistic] = nullptr;
  }
}

ordered_json policy_json_without_removals(const Policy& p) {
  ordered_json rules = {
      {"flash_hazard_rejects", p.flash_hazard_rejects},
      {"stream_mismatch_review_s", optional_json(p.stream_mismatch_review_s)},
      {"coherence_review_below", optional_json(p.coherence_review_below)},
      {"coherence_reject_below", optional_json(p.coherence_reject_below)},
      {"dropped_frames_review",
       p.dropped_frames_review ? ordered_json(*p.dropped_frames_review) : ordered_json(nullptr)},
      {"decode_warnings_review", p.decode_warnings_review}};
  return {
      {"schema", kPolicySchema}, {"name", p.name}, {"rules", rules}, {"metrics", metrics_json(p)}};
}

const ordered_json& default_policy_json() {
  static const ordered_json j = policy_json_without_removals(default_policy());
  return j;
}

}  // namespace

const std::vector<std::string>& policy_statistics() {
  static const std::vector<std::string> names = {
      "mean", "p50", "p95", "max", "segment_count", "longest_segment_s", "segment_total_s"};
  return names;
}

ordered_json policy_to_json(const Policy& policy) {
  ordered_json out = policy_json_without_removals(policy);
  add_removals(out["metrics"], default_policy_json()["metrics"]);
  return out;
}

Expected<Policy> parse_policy(const std::string& json_text, const std::string& subject) {
  auto parsed = parse_json_text(json_text, subject, ErrorKind::usage);
  if (!parsed) return parsed.error();
  const json& patch = *parsed;
  if (!patch.is_object()) return usage_error(subject, "a policy must be a JSON object");
  std::set<std::string> known_metrics;
  for (const auto& [metric, entry] : default_policy_json()["metrics"].items())
    known_metrics.insert(metric);
  json merged = json::parse(default_policy_json().dump());
  merged.merge_patch(patch);
  try {
    return read_policy(merged, known_metrics);
  } catch (const BadKey& bad) {
    return usage_error(bad.path.empty() ? subject : subject + ": " + bad.path, bad.cause);
  } catch (const json::exception& e) {
    return usage_error(subject, std::string("malformed policy: ") + e.what());
  }
}

Expected<Policy> load_policy(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) return usage_error(path, "cannot open policy file");
  std::stringstream buffer;
  buffer << in.rdbuf();
  return parse_policy(buffer.str(), path);
}

}  // namespace clipwarden
