// evaluate_policy on reports built in memory. The rules are our own contract
// (docs/report.md "verdict", docs/gate.md); the flash rule follows WCAG 2.x ("more than
// three flashes in any one-second period"); the reasons must name the metric,
// the value, the threshold and the time range.
#include <gtest/gtest.h>

#include "clipwarden/policy.h"
#include "support/gate_fixtures.h"

using namespace clipwarden;
using clipwarden::fixtures::add_segment;
using clipwarden::fixtures::add_series;
using clipwarden::fixtures::gate_report;

namespace {

bool has_reason(const VerdictResult& v, const std::string& text) {
  for (const auto& r : v.reasons)
    if (r.find(text) != std::string::npos) return true;
  return false;
}

std::string all_reasons(const VerdictResult& v) {
  std::string out;
  for (const auto& r : v.reasons) out += "\n  " + r;
  return out;
}

Policy policy_from(const std::string& json) {
  auto p = parse_policy(json, "test policy");
  EXPECT_TRUE(p.ok()) << p.error().message();
  return p.ok() ? *p : default_policy();
}

}  // namespace

TEST(GateEvaluate, CalmClipPasses) {
  Report r = gate_report(48, 24);
  add_series(r, "warp_error", 0.002);
  add_series(r, "flicker", 0.001);
  const VerdictResult v = evaluate_policy(r, default_policy());
  EXPECT_EQ(v.status, Verdict::pass) << all_reasons(v);
  EXPECT_TRUE(v.reasons.empty());
}

TEST(GateEvaluate, SummaryStatisticReasonNamesMetricValueThresholdAndTime) {
  Report r = gate_report(48, 24);
  add_series(r, "flicker", 0.001, 0.12, 12, 40);  // p95 = 0.12
  const VerdictResult v = evaluate_policy(r, default_policy());
  EXPECT_EQ(v.status, Verdict::reject);
  EXPECT_TRUE(has_reason(v, "flicker p95 0.12 >= reject 0.1 (frames 12-40, 0.50-1.67 s)"))
      << all_reasons(v);
}

TEST(GateEvaluate, ReviewLevelNamesTheReviewThreshold) {
  Report r = gate_report(48, 24);
  add_series(r, "flicker", 0.001, 0.055, 30, 35);  // p95 0.055: above review 0.05, below reject 0.1
  const VerdictResult v = evaluate_policy(r, default_policy());
  EXPECT_EQ(v.status, Verdict::review) << all_reasons(v);
  EXPECT_TRUE(has_reason(v, "flicker p95 0.055 >= review 0.05 (frames 30-35, 1.25-1.46 s)"))
      << all_reasons(v);
}

TEST(GateEvaluate, SegmentSeverityDecides) {
  Report review = gate_report(48, 24);
  add_series(review, "warp_error_ratio", 0.3);
  add_segment(review, "warp_error_ratio", 6, 8, 3.5, Severity::review);
  VerdictResult v = evaluate_policy(review, default_policy());
  EXPECT_EQ(v.status, Verdict::review);
  EXPECT_TRUE(has_reason(v, "warp_error_ratio segment peak 3.5 >= review 3 (frames 6-8, 0.25-0.33 s): the "
                            "picture changes more than its motion explains, for 0.1 s"))
      << all_reasons(v);

  Report reject = review;
  add_segment(reject, "warp_error_ratio", 20, 20, 9, Severity::reject);
  add_segment(reject, "warp_error_ratio", 30, 31, 8.5, Severity::reject);
  v = evaluate_policy(reject, default_policy());
  EXPECT_EQ(v.status, Verdict::reject);
  EXPECT_TRUE(has_reason(
      v, "warp_error_ratio segment peak 9 >= reject 8 (frame 20, 0.83 s), 2 reject segments in all"))
      << all_reasons(v);

  Report info = gate_report(48, 24);
  add_series(info, "warp_error_ratio", 0.3);
  add_segment(info, "warp_error_ratio", 6, 8, 2.5, Severity::info);
  EXPECT_EQ(evaluate_policy(info, default_policy()).status, Verdict::pass);
}

TEST(GateEvaluate, FlashHazardRejectsUnlessTurnedOff) {
  Report r = gate_report(48, 24);
  add_series(r, "flash", 0, 5, 10, 20);  // 5 flashes within the one-second window
  VerdictResult v = evaluate_policy(r, default_policy());
  EXPECT_EQ(v.status, Verdict::reject);
  EXPECT_TRUE(has_reason(v, "flash hazard: 5 flashes in one second > 3")) << all_reasons(v);
  EXPECT_TRUE(has_reason(v, "(frames 10-20, 0.42-0.83 s)")) << all_reasons(v);

  Report three = gate_report(48, 24);
  add_series(three, "flash", 0, 3, 10, 20);  // exactly 3 is within the WCAG limit
  EXPECT_FALSE(has_reason(evaluate_policy(three, default_policy()), "flash hazard"));

  const Policy lenient = policy_from(R"({"rules": {"flash_hazard_rejects": false}})");
  EXPECT_FALSE(has_reason(evaluate_policy(r, lenient), "flash hazard"));
}

TEST(GateEvaluate, StreamMismatchDroppedFramesAndDecodeWarningsReview) {
  Report r = gate_report(48, 24);
  r.summary.stream.audio_duration_s = 3.5;
  r.summary.stream.mismatch_s = 1.5;
  VerdictResult v = evaluate_policy(r, default_policy());
  EXPECT_EQ(v.status, Verdict::review);
  EXPECT_TRUE(has_reason(
      v, "stream audio/video duration mismatch 1.50 s >= review 1 s (video 2.00 s, audio 3.50 s)"))
      << all_reasons(v);

  Report dropped = gate_report(48, 24);
  dropped.summary.stream.dropped_frames = 4;
  for (int i = 30; i < 48; ++i) dropped.frame_times_s[i] += 4 / 24.0;  // a gap before frame 30
  v = evaluate_policy(dropped, default_policy());
  EXPECT_TRUE(has_reason(v, "stream dropped_frames 4 >= review 3 (frame 30")) << all_reasons(v);

  // With the flow's occlusion share known, the gap counts only when the
  // pair across it loses more of the picture than its neighbours
  // (timestamp_gaps.h): 7% against 1% does, 1.2% against 1% does not.
  Report jumps = dropped;
  add_series(jumps, "occluded_pct", 1.0, 7.0, 30, 30);
  EXPECT_TRUE(
      has_reason(evaluate_policy(jumps, default_policy()), "stream dropped_frames 4 >= review 3"));
  Report holds = dropped;
  add_series(holds, "occluded_pct", 1.0, 1.2, 30, 30);
  EXPECT_FALSE(has_reason(evaluate_policy(holds, default_policy()), "stream dropped_frames"))
      << all_reasons(evaluate_policy(holds, default_policy()));

  // The decoder's complaints, as the video source counts them, review.
  for (auto field :
       {&StreamFacts::decode_errors, &StreamFacts::concealed_frames, &StreamFacts::lost_frames}) {
    Report warned = gate_report(48, 24);
    warned.summary.stream.*field = 2;
    v = evaluate_policy(warned, default_policy());
    EXPECT_EQ(v.status, Verdict::review) << all_reasons(v);
    EXPECT_TRUE(has_reason(v, "stream decoder reported damage")) << all_reasons(v);
    EXPECT_EQ(
        evaluate_policy(warned, policy_from(R"({"rules": {"decode_warnings_review": false}})"))
            .status,
        Verdict::pass);
  }
  Report warned = gate_report(48, 24);
  warned.summary.stream.decode_errors = 6;
  warned.summary.stream.lost_frames = 1;
  EXPECT_TRUE(has_reason(evaluate_policy(warned, default_policy()),
                         "decode_errors 6, concealed_frames 0, lost_frames 1 (whole clip"));
}

TEST(GateEvaluate, CoherenceFloors) {
  Report r = gate_report(48, 24);
  r.summary.coherence = 42;
  VerdictResult v = evaluate_policy(r, default_policy());
  EXPECT_EQ(v.status, Verdict::review);
  EXPECT_TRUE(has_reason(v, "coherence 42 < review floor 50 (whole clip, 0.00-2.00 s)"))
      << all_reasons(v);
  v = evaluate_policy(r, policy_from(R"({"rules": {"coherence_reject_below": 45}})"));
  EXPECT_EQ(v.status, Verdict::reject);
  EXPECT_TRUE(has_reason(v, "coherence 42 < reject floor 45")) << all_reasons(v);
}

TEST(GateEvaluate, SegmentStatisticsUseDurationsInSeconds) {
  // A freeze of frames 10-40 at 24 fps lasts 31 frame intervals: 1.29 s.
  Report r = gate_report(48, 24);
  add_series(r, "freeze", 0, 1, 10, 40);
  add_segment(r, "freeze", 10, 40, 1, Severity::info);
  VerdictResult v = evaluate_policy(r, default_policy());
  EXPECT_EQ(v.status, Verdict::reject);
  EXPECT_TRUE(
      has_reason(v, "freeze longest_segment_s 1.29 >= reject 1 (frames 10-40, 0.42-1.67 s)"))
      << all_reasons(v);
  // Three short flicker pulses: segment_count reviews, the span is named.
  Report pulses = gate_report(48, 24);
  add_series(pulses, "flicker", 0.001);
  for (int f : {5, 20, 35}) add_segment(pulses, "flicker", f, f, 0.011, Severity::info);
  v = evaluate_policy(pulses, default_policy());
  EXPECT_TRUE(has_reason(v, "flicker segment_count 3 >= review 3 (frames 5-35, 0.21-1.46 s)"))
      << all_reasons(v);
}

TEST(GateEvaluate, DetailsRulesReadNestedNumbers) {
  Report r = gate_report(48, 24);
  add_series(r, "flicker", 0.001);
  r.summary.details["flicker"] = {{"flicker_index", 0.2}, {"band", {{"hz", 12.5}}}};
  const Policy p = policy_from(
      R"({"metrics": {"flicker": {"thresholds": {"details.flicker_index": {"review": 0.1},
                                                  "details.band.hz": {"reject": 10}}}}})");
  VerdictResult v = evaluate_policy(r, p);
  EXPECT_EQ(v.status, Verdict::reject);
  EXPECT_TRUE(has_reason(v, "flicker details.flicker_index 0.2 >= review 0.1 (whole clip"))
      << all_reasons(v);
  EXPECT_TRUE(has_reason(v, "flicker details.band.hz 12.5 >= reject 10")) << all_reasons(v);
  // Rejects are listed before reviews.
  ASSERT_EQ(v.reasons.size(), 2u);
  EXPECT_NE(v.reasons[0].find("reject"), std::string::npos);
}

TEST(GateEvaluate, MetricsNotMeasuredAreSkipped) {
  Report r = gate_report(48, 24);  // no series at all
  EXPECT_EQ(evaluate_policy(r, default_policy()).status, Verdict::pass);
}
