// Fuzz target: the policy parser (parse_policy), the policy writer and the
// verdict it gives. A policy that parses must be written back as JSON that
// parses again to the same text (policy.h promises parse_policy accepts
// policy_to_json's output unchanged), and evaluating it on a small report
// must not crash. Usage errors are the expected answer to bad text.
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <string>

#include "clipwarden/policy.h"

namespace {

[[noreturn]] void contract_broken(const char* what, const std::string& text) {
  std::fprintf(stderr, "policy_fuzz: %s\n%s\n", what, text.c_str());
  std::abort();
}

// Twelve frames with a spike in the middle for every metric the policy names,
// summaries, one segment each and some details, so every rule has something
// to look at.
clipwarden::Report sample_report(const clipwarden::Policy& policy) {
  clipwarden::Report report;
  for (int i = 0; i < 12; ++i) report.frame_times_s.push_back(i / 10.0);
  report.summary.details = nlohmann::json::object();
  auto add_metric = [&](const std::string& metric) {
    if (report.find_series(metric)) return;
    clipwarden::MetricSeries series{metric, {}};
    for (int i = 0; i < 12; ++i) series.values.push_back(i == 6 ? 50.0 : 0.5 * i);
    report.series.push_back(series);
    report.summary.metrics.push_back({metric, 4.0, 2.5, 40.0, 50.0});
    report.segments.push_back({metric, 5, 7, 0.5, 0.7, 50.0, 6, clipwarden::Severity::review});
    report.summary.details[metric] = {{"count", 3}, {"nested", {{"value", 2.5}}}};
  };
  for (const auto& [metric, rule] : policy.segments) add_metric(metric);
  for (const auto& rule : policy.rules) add_metric(rule.metric);
  report.summary.stream.decode_errors = 1;  // so the decoder-damage rule has something to judge
  report.summary.coherence = 55;
  return report;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const std::string text(reinterpret_cast<const char*>(data), size);
  auto policy = clipwarden::parse_policy(text, "fuzz.json");
  if (!policy) return 0;
  const std::string written = clipwarden::policy_to_json(*policy).dump();
  auto again = clipwarden::parse_policy(written, "written.json");
  if (!again) contract_broken(("written policy does not parse: " + again.error().cause).c_str(), written);
  if (clipwarden::policy_to_json(*again).dump() != written)
    contract_broken("written policy changes when read back", written);
  (void)clipwarden::evaluate_policy(sample_report(*policy), *policy);
  (void)clipwarden::evaluate_policy(clipwarden::Report{}, *policy);
  return 0;
}
