// Calibration (include/clipwarden/calibrate.h) on synthetic decisions made
// by a known bar: people reject a clip whose flicker p95 is at least 0.15,
// want a second look from 0.06, and keep the rest. Starting from the
// built-in policy (flicker p95 review 0.05, reject 0.1), the proposal must
// recover both levels to within half the spacing of the clips' values
// (0.005 apart, so +-0.0025), agree with every decision, and write a policy
// that gate reads back. Too few decisions: nothing moves, and the count
// needed is given.
#include <gtest/gtest.h>

#include "clipwarden/calibrate.h"
#include "support/gate_fixtures.h"

using namespace clipwarden;

namespace {

std::vector<DecidedClip> decided_by_bar(int n, double review_bar, double reject_bar) {
  std::vector<DecidedClip> out;
  for (int i = 0; i < n; ++i) {
    const double p95 = 0.0025 + 0.005 * i;
    Report r = fixtures::gate_report(48, 24);
    fixtures::add_series(r, "flicker", p95);
    r.verdict = evaluate_policy(r, default_policy());
    const std::string decision = p95 >= reject_bar ? "reject" : p95 >= review_bar ? "second_look" : "keep";
    out.push_back({"clip-" + std::to_string(i), std::move(r), decision});
  }
  return out;
}

const SummaryRule* flicker_p95(const Policy& p) {
  for (const auto& r : p.rules)
    if (r.metric == "flicker" && r.statistic == "p95") return &r;
  return nullptr;
}

}  // namespace

TEST(Calibrate, RecoversTheLevelsPeopleDecidedBy) {
  const auto clips = decided_by_bar(60, 0.06, 0.15);
  ASSERT_NE(flicker_p95(default_policy()), nullptr);
  const Calibration cal = calibrate_policy(clips, default_policy(), {});
  EXPECT_EQ(cal.more_needed, 0);
  EXPECT_EQ(cal.decided, 60);
  EXPECT_EQ(cal.kept, 12);  // p95 0.0025 ... 0.0575
  EXPECT_LT(cal.agree_before, 60);
  EXPECT_EQ(cal.agree_after, 60);
  EXPECT_EQ(cal.false_rejects_after, 0);
  const SummaryRule* rule = flicker_p95(cal.policy);
  ASSERT_NE(rule, nullptr);
  ASSERT_TRUE(rule->review && rule->reject);
  EXPECT_NEAR(*rule->review, 0.06, 0.0025);
  EXPECT_NEAR(*rule->reject, 0.15, 0.0025);
  bool named = false;
  for (const auto& c : cal.changes) {
    named = named || c.key == "metrics.flicker.thresholds.p95.reject";
    EXPECT_GT(c.verdicts_changed, 0) << c.key;
    EXPECT_GT(c.agree_after, c.agree_before) << c.key;
  }
  EXPECT_TRUE(named);
  // The proposal is a policy file gate accepts, with the same levels.
  auto back = parse_policy(policy_to_json(cal.policy).dump(), "calibrated.json");
  ASSERT_TRUE(back) << back.error().message();
  EXPECT_DOUBLE_EQ(*flicker_p95(*back)->reject, *rule->reject);
}

TEST(Calibrate, KeepsKeptClipsRejectedWithinTheBudget) {
  // People keep everything below 0.2 and reject above, but three kept clips
  // carry noise at the top of the range: the level that catches every
  // reject would reject those three kept clips (3 of 43, 7%), over a 5%
  // budget; the proposal must stay within it.
  auto clips = decided_by_bar(60, 10, 0.2);
  for (int i : {57, 58, 59}) clips[static_cast<size_t>(i)].decision = "keep";
  CalibrationOptions options;
  options.false_reject_budget = 0.05;
  const Calibration cal = calibrate_policy(clips, default_policy(), options);
  EXPECT_EQ(cal.more_needed, 0);
  EXPECT_LE(cal.false_rejects_after, static_cast<int>(0.05 * cal.kept));
}

TEST(Calibrate, SaysHowManyMoreDecisionsItNeeds) {
  const auto clips = decided_by_bar(12, 0.06, 0.15);
  const Calibration cal = calibrate_policy(clips, default_policy(), {});
  EXPECT_EQ(cal.more_needed, 8);  // 20 by default
  EXPECT_TRUE(cal.changes.empty());
  EXPECT_DOUBLE_EQ(*flicker_p95(cal.policy)->reject, *flicker_p95(default_policy())->reject);
}

TEST(Calibrate, AgreementByRuleCountsEachPair) {
  const auto clips = decided_by_bar(30, 0.06, 0.15);
  const auto rules = agreement_by_rule(clips, nullptr);
  int total = 0;
  for (const auto& r : rules) {
    total += r.clips;
    int cells = 0, diagonal = 0;
    for (int t = 0; t < 3; ++t)
      for (int p = 0; p < 3; ++p) cells += r.counts[t][p], diagonal += t == p ? r.counts[t][p] : 0;
    EXPECT_EQ(cells, r.clips) << r.rule;
    EXPECT_EQ(diagonal, r.agree) << r.rule;
    EXPECT_EQ(static_cast<int>(r.differ.size()), r.clips - r.agree) << r.rule;
  }
  EXPECT_EQ(total, 30);
}
