// Tuning the gate to a team's bar: how the tool's verdicts line up with the
// decisions people recorded in the review station (include/clipwarden/
// review.h), and a policy whose levels would have matched those decisions
// best without rejecting more than a chosen share of the clips people kept.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "clipwarden/error.h"
#include "clipwarden/policy.h"
#include "clipwarden/report.h"

namespace clipwarden {

// A clip people decided on: its report and their newest decision ("keep",
// "reject" or "second_look").
struct DecidedClip {
  std::string clip_id;
  Report report;
  std::string decision;
};

// The decided clips of a gate output folder: its queue, the reports it
// names and the decisions in the results store (db_path "" = DIR/clipwarden.db).
// Clips without a report (errors) are left out.
Expected<std::vector<DecidedClip>> load_decided_clips(const std::string& dir, const std::string& db_path);

// The verdict people's decision corresponds to: keep -> pass, second_look
// -> review, reject -> reject.
Verdict verdict_of_decision(const std::string& decision);

// How verdicts and decisions line up for one rule (the metric of a clip's
// first reason, "hard rules" for the others, "no rule fired" for passes).
struct RuleAgreement {
  std::string rule;
  int clips = 0;
  int agree = 0;              // the tool's verdict is the decision's verdict
  int counts[3][3] = {};      // [tool verdict][people's verdict], pass/review/reject
  std::vector<std::string> differ;  // clip ids where they differ
};
// `policy` null: the verdicts the reports hold (the gate's at the time).
std::vector<RuleAgreement> agreement_by_rule(const std::vector<DecidedClip>& clips, const Policy* policy);

// One level the calibration moved, and what the move did on the decided clips.
struct LevelChange {
  std::string key;  // its path in a policy file, e.g. "metrics.flicker.thresholds.p95.reject"
  std::optional<double> before;
  std::optional<double> after;
  int verdicts_changed = 0;  // clips whose verdict the move changed
  int agree_before = 0;      // clips agreeing with people just before / after the move
  int agree_after = 0;
};

struct Calibration {
  int decided = 0;
  int more_needed = 0;  // > 0: too few decisions to calibrate; how many more
  Policy policy;        // the proposed policy (the starting one when more_needed > 0)
  std::vector<LevelChange> changes;
  int agree_before = 0, agree_after = 0;
  int kept = 0;  // clips people kept
  int false_rejects_before = 0, false_rejects_after = 0;  // kept clips the tool rejects
};

struct CalibrationOptions {
  double false_reject_budget = 0.05;  // share of kept clips the policy may reject
  int min_decisions = 20;             // fewer decided clips: nothing is proposed
  int min_each = 3;                   // and at least this many kept and this many not kept
};

// Moves one level at a time (each rule's review and reject level, each
// segment rule's review and reject peak) to the value that makes the most
// verdicts match the decisions while kept clips rejected stay within the
// budget, until no move helps. Candidate levels lie halfway between the
// values the decided clips show for the statistic, so a level found sits
// between the last clip on one side and the first on the other. Segments
// are re-graded from their stored peaks; where segments start (enter level)
// needs a new analysis and is not moved.
Calibration calibrate_policy(const std::vector<DecidedClip>& clips, const Policy& start,
                             const CalibrationOptions& options);

}  // namespace clipwarden
