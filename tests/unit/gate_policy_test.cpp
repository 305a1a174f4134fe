// Policy files (analyzer/policy/policy_json.cpp): the format is our own
// contract (docs/gate.md, "Policy files"): unknown keys, wrong types and
// impossible thresholds are usage errors naming the key path; the default
// policy printed as JSON reads back unchanged.
#include <gtest/gtest.h>

#include <cmath>

#include "clipwarden/policy.h"

using namespace clipwarden;

namespace {

// The error of parsing `text`, which must fail.
Error parse_error(const std::string& text) {
  auto p = parse_policy(text, "p.json");
  EXPECT_FALSE(p.ok()) << "accepted: " << text;
  return p.ok() ? Error{} : p.error();
}

// The error must be a usage error whose one line names the file and `key`.
void expect_names_key(const std::string& text, const std::string& key) {
  const Error e = parse_error(text);
  EXPECT_EQ(e.kind, ErrorKind::usage) << text;
  EXPECT_NE(e.message().find("p.json"), std::string::npos) << e.message();
  EXPECT_NE(e.message().find(key), std::string::npos)
      << "message '" << e.message() << "' should name " << key;
}

const SummaryRule* find_rule(const Policy& p, const std::string& metric,
                             const std::string& statistic) {
  for (const auto& r : p.rules)
    if (r.metric == metric && r.statistic == statistic) return &r;
  return nullptr;
}

}  // namespace

TEST(GatePolicy, DefaultRoundTripsUnchanged) {
  const std::string printed = policy_to_json(default_policy()).dump(2);
  auto back = parse_policy(printed, "printed");
  ASSERT_TRUE(back.ok()) << back.error().message();
  EXPECT_EQ(policy_to_json(*back).dump(2), printed);
  EXPECT_EQ(back->segments.size(), default_policy().segments.size());
  EXPECT_EQ(back->rules.size(), default_policy().rules.size());
}

// A policy file as docs/gate.md describes the format, written by hand: every
// hard rule and every segment field differs from the default, so a key the
// writer leaves out or the reader ignores shows.
const char* kNightShootPolicy = R"({
  "schema": "clipwarden.policy/1",
  "name": "night-shoot",
  "rules": {
    "flash_hazard_rejects": false,
    "stream_mismatch_review_s": null,
    "coherence_review_below": 61.5,
    "coherence_reject_below": 30.5,
    "dropped_frames_review": 4,
    "decode_warnings_review": false
  },
  "metrics": {
    "flicker": {
      "segment": {"enter": 0.75, "leave": 0.5, "min_frames": 3, "merge_gap_frames": 5, "baseline_k": 2.5,
                  "review_peak": 1.25, "reject_peak": null},
      "thresholds": {"p95": {"review": 0.375, "reject": 0.625}, "segment_count": {"review": 2, "reject": null}}
    }
  }
})";

TEST(GatePolicy, HandWrittenFileReadsIntoEveryFieldAndIsWrittenBack) {
  auto p = parse_policy(kNightShootPolicy, "night.json");
  ASSERT_TRUE(p.ok()) << p.error().message();
  EXPECT_EQ(p->name, "night-shoot");
  EXPECT_FALSE(p->flash_hazard_rejects);
  EXPECT_FALSE(p->stream_mismatch_review_s.has_value());
  EXPECT_EQ(p->coherence_review_below, 61.5);
  EXPECT_EQ(p->coherence_reject_below, 30.5);
  EXPECT_EQ(p->dropped_frames_review, 4);
  EXPECT_FALSE(p->decode_warnings_review);
  ASSERT_EQ(p->segments.count("flicker"), 1u);
  const SegmentRule& seg = p->segments.at("flicker");
  EXPECT_EQ(seg.enter, 0.75);
  EXPECT_EQ(seg.leave, 0.5);
  EXPECT_EQ(seg.min_frames, 3);
  EXPECT_EQ(seg.merge_gap_frames, 5);
  EXPECT_EQ(seg.baseline_k, 2.5);
  EXPECT_EQ(seg.review_peak, 1.25);
  EXPECT_FALSE(std::isfinite(seg.reject_peak));  // null: never rejects from the peak
  const SummaryRule* p95 = find_rule(*p, "flicker", "p95");
  ASSERT_NE(p95, nullptr);
  EXPECT_EQ(p95->review, 0.375);
  EXPECT_EQ(p95->reject, 0.625);
  const SummaryRule* count = find_rule(*p, "flicker", "segment_count");
  ASSERT_NE(count, nullptr);
  EXPECT_EQ(count->review, 2);
  EXPECT_FALSE(count->reject.has_value());

  // Written back: the hand-written keys with the same values. Other metrics
  // keep the default's rules (the file is a patch over the default) and are
  // not compared here.
  const nlohmann::json written = nlohmann::json::parse(policy_to_json(*p).dump());
  const nlohmann::json expected = nlohmann::json::parse(kNightShootPolicy);
  EXPECT_EQ(written["schema"], expected["schema"]);
  EXPECT_EQ(written["name"], expected["name"]);
  EXPECT_EQ(written["rules"], expected["rules"]);
  EXPECT_EQ(written["metrics"]["flicker"]["segment"], expected["metrics"]["flicker"]["segment"]);
  for (const auto& [statistic, levels] : expected["metrics"]["flicker"]["thresholds"].items())
    EXPECT_EQ(written["metrics"]["flicker"]["thresholds"][statistic], levels) << statistic;
}

TEST(GatePolicy, DefaultCoversTheInitialMetricsWithPossibleThresholds) {
  const Policy& p = default_policy();
  // flash has no segment rule: its metric writes the WCAG hazard segments
  // itself, and the hard rule flash_hazard_rejects judges them.
  for (const char* metric : {"warp_error_ratio", "warp_error_long_ratio", "occluded_pct", "flicker", "freeze",
                             "cut", "drift", "jolt", "flicker_local", "boiling"})
    EXPECT_TRUE(p.segments.count(metric)) << metric;
  EXPECT_TRUE(p.flash_hazard_rejects);
  for (const auto& [metric, r] : p.segments) {
    EXPECT_LE(r.leave, r.enter) << metric;
    EXPECT_GE(r.min_frames, 1) << metric;
    EXPECT_LE(r.review_peak, r.reject_peak) << metric;
  }
  for (const auto& r : p.rules)
    if (r.review && r.reject) EXPECT_LE(*r.review, *r.reject) << r.metric << " " << r.statistic;
}

TEST(GatePolicy, KeysGivenOverrideTheDefaultAndTheRestIsKept) {
  auto p = parse_policy(
      R"({"name": "strict", "metrics": {"flicker": {"thresholds": {"p95": {"reject": 0.05}},
                                                                      "segment": {"enter": 0.02}}}})",
      "p.json");
  ASSERT_TRUE(p.ok()) << p.error().message();
  EXPECT_EQ(p->name, "strict");
  const SummaryRule* p95 = find_rule(*p, "flicker", "p95");
  ASSERT_NE(p95, nullptr);
  EXPECT_EQ(p95->reject, 0.05);
  EXPECT_EQ(p95->review, find_rule(default_policy(), "flicker", "p95")->review);
  EXPECT_EQ(p->segments.at("flicker").enter, 0.02);
  EXPECT_EQ(p->segments.at("flicker").leave, default_policy().segments.at("flicker").leave);
  EXPECT_EQ(policy_to_json(*p)["metrics"]["warp_error_ratio"],
            policy_to_json(default_policy())["metrics"]["warp_error_ratio"]);
}

TEST(GatePolicy, NullTurnsRulesOffAndSurvivesARoundTrip) {
  auto p = parse_policy(
      R"({"metrics": {"flicker": {"thresholds": {"p95": null}, "segment": {"reject_peak": null}},
                                        "cut": null},
                            "rules": {"coherence_review_below": null, "flash_hazard_rejects": false}})",
      "p.json");
  ASSERT_TRUE(p.ok()) << p.error().message();
  EXPECT_EQ(find_rule(*p, "flicker", "p95"), nullptr);
  EXPECT_TRUE(std::isinf(p->segments.at("flicker").reject_peak));
  EXPECT_FALSE(p->segments.count("cut"));
  EXPECT_EQ(find_rule(*p, "cut", "segment_count"), nullptr);
  EXPECT_FALSE(p->coherence_review_below.has_value());
  EXPECT_FALSE(p->flash_hazard_rejects);
  // Printed and read back, the removed rules stay removed.
  auto back = parse_policy(policy_to_json(*p).dump(), "again");
  ASSERT_TRUE(back.ok()) << back.error().message();
  EXPECT_EQ(policy_to_json(*back), policy_to_json(*p));
  EXPECT_FALSE(back->segments.count("cut"));
}

TEST(GatePolicy, DetailsStatisticsAreAccepted) {
  auto p = parse_policy(
      R"({"metrics": {"flicker": {"thresholds": {"details.flicker_index": {"review": 0.1}}}}})",
      "p.json");
  ASSERT_TRUE(p.ok()) << p.error().message();
  ASSERT_NE(find_rule(*p, "flicker", "details.flicker_index"), nullptr);
}

TEST(GatePolicy, UnknownKeysAreNamed) {
  expect_names_key(R"({"metric": {}})", "metric");
  expect_names_key(R"({"metrics": {"flickr": {}}})", "metrics.flickr");
  expect_names_key(R"({"metrics": {"flicker": {"segmnt": {}}}})", "metrics.flicker.segmnt");
  expect_names_key(R"({"metrics": {"flicker": {"segment": {"entr": 1}}}})",
                   "metrics.flicker.segment.entr");
  expect_names_key(R"({"metrics": {"flicker": {"thresholds": {"p99": {"review": 1}}}}})",
                   "metrics.flicker.thresholds.p99");
  expect_names_key(R"({"metrics": {"flicker": {"thresholds": {"p95": {"warn": 1}}}}})",
                   "metrics.flicker.thresholds.p95.warn");
  expect_names_key(R"({"rules": {"flash_hazard": true}})", "rules.flash_hazard");
}

TEST(GatePolicy, WrongTypesAreNamed) {
  expect_names_key(R"({"metrics": {"flicker": {"segment": {"enter": "high"}}}})",
                   "metrics.flicker.segment.enter");
  expect_names_key(R"({"metrics": {"flicker": {"segment": 3}}})", "metrics.flicker.segment");
  expect_names_key(R"({"metrics": {"flicker": {"segment": {"min_frames": 1.5}}}})",
                   "metrics.flicker.segment.min_frames");
  expect_names_key(R"({"metrics": {"flicker": {"thresholds": {"p95": 0.3}}}})",
                   "metrics.flicker.thresholds.p95");
  expect_names_key(R"({"rules": {"flash_hazard_rejects": "yes"}})", "rules.flash_hazard_rejects");
  expect_names_key(R"({"rules": {"dropped_frames_review": 0.5}})", "rules.dropped_frames_review");
  expect_names_key(R"({"name": 7})", "name");
  expect_names_key(R"({"schema": "clipwarden.policy/9"})", "schema");
  expect_names_key(R"({"metrics": []})", "metrics");
}

TEST(GatePolicy, ImpossibleThresholdsAreNamed) {
  expect_names_key(
      R"({"metrics": {"flicker": {"thresholds": {"p95": {"review": 0.5, "reject": 0.1}}}}})",
      "metrics.flicker.thresholds.p95.review");
  // Review above the default reject (0.1) is impossible too.
  expect_names_key(R"({"metrics": {"flicker": {"thresholds": {"p95": {"review": 0.2}}}}})",
                   "metrics.flicker.thresholds.p95.review");
  expect_names_key(R"({"metrics": {"flicker": {"segment": {"enter": 0.01, "leave": 0.02}}}})",
                   "metrics.flicker.segment.leave");
  expect_names_key(
      R"({"metrics": {"flicker": {"segment": {"review_peak": 0.5, "reject_peak": 0.1}}}})",
      "metrics.flicker.segment.review_peak");
  expect_names_key(R"({"metrics": {"flicker": {"segment": {"enter": -1}}}})",
                   "metrics.flicker.segment.enter");
  expect_names_key(R"({"metrics": {"flicker": {"segment": {"min_frames": 0}}}})",
                   "metrics.flicker.segment.min_frames");
  expect_names_key(R"({"metrics": {"flicker": {"thresholds": {"mean": {"review": -0.1}}}}})",
                   "metrics.flicker.thresholds.mean.review");
  expect_names_key(R"({"rules": {"coherence_review_below": 140}})", "rules.coherence_review_below");
  expect_names_key(R"({"rules": {"coherence_review_below": 40, "coherence_reject_below": 60}})",
                   "rules.coherence_reject_below");
  expect_names_key(R"({"rules": {"stream_mismatch_review_s": -2}})",
                   "rules.stream_mismatch_review_s");
}

TEST(GatePolicy, RequiredValuesRemovedByNullAreNamed) {
  expect_names_key(R"({"metrics": {"flicker": {"segment": {"enter": null}}}})",
                   "metrics.flicker.segment.enter");
  expect_names_key(R"({"rules": {"flash_hazard_rejects": null}})", "rules.flash_hazard_rejects");
}

TEST(GatePolicy, BrokenFilesAreUsageErrorsNamingTheFile) {
  Error e = parse_error("{\"metrics\": ");
  EXPECT_EQ(e.kind, ErrorKind::usage);
  EXPECT_NE(e.message().find("p.json"), std::string::npos);
  EXPECT_NE(e.message().find("not valid JSON"), std::string::npos);
  e = parse_error("[1, 2]");
  EXPECT_NE(e.message().find("object"), std::string::npos);
  auto missing = load_policy("/nonexistent/policy.json");
  ASSERT_FALSE(missing.ok());
  EXPECT_EQ(missing.error().kind, ErrorKind::usage);
  EXPECT_NE(missing.error().message().find("/nonexistent/policy.json"), std::string::npos);
}
