#include <algorithm>
#include <cmath>
#include <filesystem>
#include <functional>
#include <map>
#include <set>
#include <tuple>

#include "analyzer/metrics/metric_descriptor.h"
#include "analyzer/review/review_folder.h"
#include "analyzer/store/decision_log.h"
#include "clipwarden/calibrate.h"
#include "clipwarden/report_io.h"

namespace clipwarden {
namespace {

constexpr int kMaxCandidates = 48;
constexpr int kMaxPasses = 4;

int verdict_index(Verdict v) { return v == Verdict::pass ? 0 : v == Verdict::review ? 1 : 2; }

// A level the calibration may move: where it sits in the policy, its name
// in a policy file, and the values the decided clips show for it.
struct Knob {
  std::string key;
  std::function<std::optional<double>&(Policy&)> optional_level;  // summary rules
  std::function<double&(Policy&)> peak_level;                     // segment rules
  std::vector<double> values;
};

std::optional<double> get(const Knob& k, Policy& p) {
  if (k.optional_level) return k.optional_level(p);
  const double v = k.peak_level(p);
  return std::isfinite(v) ? std::optional<double>(v) : std::nullopt;
}
void set(const Knob& k, Policy& p, double v) {
  if (k.optional_level)
    k.optional_level(p) = v;
  else
    k.peak_level(p) = v;
}

// Levels halfway between neighbouring values, plus one below the smallest
// (when positive) and one above the largest (thinned to at most
// kMaxCandidates).
std::vector<double> candidate_levels(std::vector<double> values) {
  std::sort(values.begin(), values.end());
  values.erase(std::unique(values.begin(), values.end()), values.end());
  std::vector<double> out;
  if (values.empty()) return out;
  // Policy levels are never negative (load_policy refuses them).
  if (values.front() > 0) out.push_back(values.front() / 2);
  for (size_t i = 1; i < values.size(); ++i) out.push_back((values[i - 1] + values[i]) / 2);
  out.push_back(values.back() > 0 ? values.back() * 2 : values.back() + 1);
  if (out.size() > static_cast<size_t>(kMaxCandidates)) {
    std::vector<double> thin;
    for (int i = 0; i < kMaxCandidates; ++i)
      thin.push_back(out[static_cast<size_t>(i) * (out.size() - 1) / (kMaxCandidates - 1)]);
    out = thin;
  }
  return out;
}

std::vector<Knob> knobs_of(const Policy& policy, const std::vector<DecidedClip>& clips) {
  std::vector<Knob> out;
  for (size_t i = 0; i < policy.rules.size(); ++i) {
    const SummaryRule& rule = policy.rules[i];
    std::vector<double> values;
    for (const auto& c : clips)
      if (auto v = rule_statistic(c.report, rule)) values.push_back(*v);
    if (values.empty()) continue;
    const std::string base = "metrics." + rule.metric + ".thresholds." + rule.statistic + ".";
    if (rule.review)
      out.push_back({base + "review", [i](Policy& p) -> std::optional<double>& { return p.rules[i].review; }, {}, values});
    if (rule.reject)
      out.push_back({base + "reject", [i](Policy& p) -> std::optional<double>& { return p.rules[i].reject; }, {}, values});
  }
  for (const auto& [metric, rule] : policy.segments) {
    std::vector<double> peaks;
    for (const auto& c : clips)
      for (const auto& s : c.report.segments)
        if (s.metric == metric) peaks.push_back(s.peak);
    if (peaks.empty()) continue;
    const std::string base = "metrics." + metric + ".segment.";
    const std::string m = metric;
    if (std::isfinite(rule.review_peak))
      out.push_back({base + "review_peak", {}, [m](Policy& p) -> double& { return p.segments.at(m).review_peak; }, peaks});
    if (std::isfinite(rule.reject_peak))
      out.push_back({base + "reject_peak", {}, [m](Policy& p) -> double& { return p.segments.at(m).reject_peak; }, peaks});
  }
  return out;
}

// Segments re-graded by a policy's peak levels, as the analysis grades them.
void regrade(Report& r, const Policy& p) {
  for (auto& s : r.segments) {
    auto rule = p.segments.find(s.metric);
    if (rule == p.segments.end()) continue;
    s.severity = s.peak >= rule->second.reject_peak   ? Severity::reject
                 : s.peak >= rule->second.review_peak ? Severity::review
                                                      : Severity::info;
  }
}

struct Score {
  int agree = 0;
  int false_rejects = 0;
  std::vector<Verdict> verdicts;
};

Score score(std::vector<DecidedClip>& work, const Policy& p) {
  Score s;
  for (auto& c : work) {
    regrade(c.report, p);
    const Verdict v = evaluate_policy(c.report, p).status;
    s.verdicts.push_back(v);
    const Verdict people = verdict_of_decision(c.decision);
    s.agree += v == people;
    s.false_rejects += v == Verdict::reject && people == Verdict::pass;
  }
  return s;
}

bool keeps_order(const Knob& k, const Policy& p, double v) {
  // A review level above the rule's reject level (or the reverse) is a
  // policy load_policy refuses: never propose one.
  Policy q = p;
  set(k, q, v);
  for (const auto& r : q.rules)
    if (r.review && r.reject && *r.review > *r.reject) return false;
  for (const auto& [m, s] : q.segments)
    if (std::isfinite(s.review_peak) && std::isfinite(s.reject_peak) && s.review_peak > s.reject_peak) return false;
  return true;
}

}  // namespace

Verdict verdict_of_decision(const std::string& decision) {
  return decision == "keep" ? Verdict::pass : decision == "second_look" ? Verdict::review : Verdict::reject;
}

std::vector<RuleAgreement> agreement_by_rule(const std::vector<DecidedClip>& clips, const Policy* policy) {
  std::map<std::string, RuleAgreement> by_rule;
  for (const auto& c : clips) {
    const VerdictResult v = policy ? evaluate_policy(c.report, *policy) : c.report.verdict;
    std::string rule = "no rule fired";
    if (!v.reasons.empty()) {
      rule = review::reason_metric(v.reasons.front());
      if (rule.empty()) rule = "hard rules";
    }
    RuleAgreement& a = by_rule[rule];
    a.rule = rule;
    const Verdict people = verdict_of_decision(c.decision);
    ++a.clips;
    ++a.counts[verdict_index(v.status)][verdict_index(people)];
    if (v.status == people)
      ++a.agree;
    else
      a.differ.push_back(c.clip_id);
  }
  std::vector<RuleAgreement> out;
  for (auto& [rule, a] : by_rule) out.push_back(std::move(a));
  std::stable_sort(out.begin(), out.end(), [](const auto& a, const auto& b) { return a.clips > b.clips; });
  return out;
}

Calibration calibrate_policy(const std::vector<DecidedClip>& clips, const Policy& start,
                             const CalibrationOptions& options) {
  Calibration out;
  out.policy = start;
  out.decided = static_cast<int>(clips.size());
  for (const auto& c : clips) out.kept += verdict_of_decision(c.decision) == Verdict::pass;
  const int not_kept = out.decided - out.kept;
  out.more_needed = std::max({options.min_decisions - out.decided, options.min_each - out.kept,
                              options.min_each - not_kept, 0});
  std::vector<DecidedClip> work = clips;
  const Score first = score(work, start);
  out.agree_before = out.agree_after = first.agree;
  out.false_rejects_before = out.false_rejects_after = first.false_rejects;
  if (out.more_needed > 0) return out;

  const int allowed = static_cast<int>(std::floor(options.false_reject_budget * out.kept + 1e-9));
  const std::vector<Knob> knobs = knobs_of(start, clips);
  Policy policy = start;
  Score current = first;
  std::map<std::string, size_t> change_of;  // knob key -> index in out.changes
  for (int pass = 0; pass < kMaxPasses; ++pass) {
    bool moved = false;
    for (const Knob& k : knobs) {
      const std::optional<double> was = get(k, policy);
      if (!was) continue;
      // Within the budget beats outside it; then more agreement; then fewer
      // false rejects; then the smaller move (the level stays put on a tie).
      auto rank = [&](const Score& sc, double v) {
        return std::make_tuple(sc.false_rejects <= allowed, sc.agree, -sc.false_rejects, -std::abs(v - *was));
      };
      double best_v = *was;
      Score best = current;
      for (double v : candidate_levels(k.values)) {
        if (!keeps_order(k, policy, v)) continue;
        Policy trial = policy;
        set(k, trial, v);
        Score sc = score(work, trial);
        if (rank(sc, v) > rank(best, best_v)) {
          best = std::move(sc);
          best_v = v;
        }
      }
      if (std::make_tuple(best.false_rejects <= allowed, best.agree, -best.false_rejects) <=
          std::make_tuple(current.false_rejects <= allowed, current.agree, -current.false_rejects))
        continue;
      int changed = 0;
      for (size_t i = 0; i < best.verdicts.size(); ++i) changed += best.verdicts[i] != current.verdicts[i];
      auto [it, fresh] = change_of.emplace(k.key, out.changes.size());
      if (fresh) out.changes.push_back({k.key, *was, best_v, 0, current.agree, 0});
      LevelChange& ch = out.changes[it->second];
      ch.after = best_v;
      ch.verdicts_changed += changed;
      ch.agree_after = best.agree;
      set(k, policy, best_v);
      current = std::move(best);
      moved = true;
    }
    if (!moved) break;
  }
  out.policy = policy;
  out.policy.name = start.name + "-calibrated";
  out.agree_after = current.agree;
  out.false_rejects_after = current.false_rejects;
  return out;
}

Expected<std::vector<DecidedClip>> load_decided_clips(const std::string& dir, const std::string& db_path) {
  auto queue = read_queue(dir);
  if (!queue) return queue.error();
  const std::string db = db_path.empty() ? (std::filesystem::path(dir) / "clipwarden.db").string() : db_path;
  auto log = DecisionLog::open(db);
  if (!log) return log.error();
  auto all = (*log)->all();
  if (!all) return all.error();
  std::map<std::string, std::string> decided;
  for (const auto& d : latest_decisions(*all)) decided[d.clip_id] = d.decision;
  std::vector<DecidedClip> out;
  for (const auto& r : *queue) {
    auto d = decided.find(r.input.id);
    if (d == decided.end() || r.report.empty()) continue;
    auto report = read_report_file((std::filesystem::path(dir) / r.report).string());
    if (!report) return report.error();
    out.push_back({r.input.id, std::move(*report), d->second});
  }
  return out;
}

}  // namespace clipwarden
