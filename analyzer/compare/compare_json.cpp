// compare.json ("clipwarden.compare/1") and writing both output files.
#include <cmath>
#include <filesystem>

#include "analyzer/core/byte_text.h"
#include "clipwarden/compare.h"
#include "clipwarden/report_io.h"
#include "clipwarden/version.h"

namespace clipwarden {
namespace {

// Ordered, so compare.json reads top-down: schema first, details last.
using json = nlohmann::ordered_json;

json number_or_null(double v) { return std::isfinite(v) ? json(v) : json(nullptr); }

json bootstrap_settings(const CompareOptions& o) {
  return {{"method", "BCa"},
          {"statistic", "mean of the paired differences"},
          {"resamples", o.bootstrap_resamples},
          {"seed", o.bootstrap_seed},
          {"generator", "splitmix64"},
          {"confidence_level", o.confidence_level}};
}

json metric_to_json(const MetricComparison& m, const CompareOptions& o) {
  return {{"metric", m.what.metric},
          {"statistic", m.what.statistic},
          {"family", m.primary ? "primary" : "exploratory"},
          {"n", m.n},
          {"mean_diff", number_or_null(m.mean_diff)},
          {"median_diff", number_or_null(m.median_diff)},
          {"ci_low", number_or_null(m.ci_low)},
          {"ci_high", number_or_null(m.ci_high)},
          {"p_value", number_or_null(m.p_value)},
          {"p_holm", number_or_null(m.p_holm)},
          {"effect_size", number_or_null(m.effect_size)},
          {"wins_a", m.wins_a},
          {"wins_b", m.wins_b},
          {"ties", m.ties},
          {"better", m.better},
          {"unadjusted_better", m.unadjusted_better},
          {"direction", m.what.direction},
          {"test", m.test},
          {"sign_test",
           {{"b_better", m.wins_b},
            {"b_worse", m.wins_a},
            {"ties", m.ties},
            {"p_value", number_or_null(m.sign_p_value)},
            {"b_better_share", number_or_null(m.b_better_share)},
            {"ci_low", number_or_null(m.b_better_low)},
            {"ci_high", number_or_null(m.b_better_high)},
            {"interval", "Clopper-Pearson exact"}}},
          {"seed_spread",
           {{"sd_within_prompt_a", number_or_null(m.seed_sd_a)},
            {"sd_within_prompt_b", number_or_null(m.seed_sd_b)},
            {"noise_of_prompt_difference", number_or_null(m.seed_noise)}}},
          {"bootstrap", bootstrap_settings(o)}};
}

json verdicts_to_json(const VerdictComparison& v) {
  auto counts = [](const std::array<int, 3>& c) {
    return json{{"pass", c[0]}, {"review", c[1]}, {"reject", c[2]}};
  };
  return {{"clips_a", counts(v.clips_a)},
          {"clips_b", counts(v.clips_b)},
          {"prompt_passes", "more than half of the prompt's clips pass"},
          {"prompts",
           {{"both_pass", v.both_pass},
            {"only_a_passes", v.only_a_pass},
            {"only_b_passes", v.only_b_pass},
            {"neither_passes", v.neither_pass}}},
          {"test", "McNemar exact (binomial test on the discordant prompts), two-sided"},
          {"method_used", v.test},
          {"p_value", v.p_value}};
}

json design_to_json(const DesignLimits& d) {
  return {{"prompts", d.prompts},
          {"primary_family_size", d.primary_family},
          {"smallest_p", d.smallest_p},
          {"smallest_holm_p", d.smallest_holm_p},
          {"single_test_can_reach_alpha", d.single_test_can_reach},
          {"primary_can_reach_alpha", d.primary_can_reach},
          {"prompts_needed_single", d.prompts_needed_single},
          {"prompts_needed_primary", d.prompts_needed_primary},
          {"basis",
           "exact paired tests on n prompts cannot go below 2/2^n; Holm's first step multiplies "
           "the smallest p by the primary family size"}};
}

json report_paths(const std::vector<ClipEntry>& clips) {
  json out = json::array();
  for (const auto& c : clips) out.push_back(c.report_path);
  return out;
}

json pair_to_json(const PairedKey& p, const std::vector<MetricComparison>& metrics) {
  json values = json::object();
  for (size_t i = 0; i < metrics.size(); ++i)
    values[metrics[i].what.key()] = {{"a", number_or_null(p.a_values[i])},
                                     {"b", number_or_null(p.b_values[i])}};
  // Seeds are kept as the queue wrote them; the two json flavours convert via text.
  json seeds_a = json::array(), seeds_b = json::array();
  for (const auto& c : p.a) seeds_a.push_back(json::parse(c.seed.dump()));
  for (const auto& c : p.b) seeds_b.push_back(json::parse(c.seed.dump()));
  return {{"key", p.key},
          {"a_reports", report_paths(p.a)},
          {"b_reports", report_paths(p.b)},
          {"a_seeds", seeds_a},
          {"b_seeds", seeds_b},
          {"values", values}};
}

json settings_to_json(const Comparison& c) {
  const auto& o = c.options;
  return {
      {"test", "Wilcoxon signed-rank, two-sided, on the paired differences B - A"},
      {"exact_up_to_n", 50},
      {"exact_when",
       "at most 50 ranked differences, none of them zero (tied ones keep average ranks: "
       "exact given the ties); otherwise the normal approximation with tie correction"},
      {"zero_rule", to_string(o.zero_rule)},
      {"statistics", o.statistics},
      {"effect_size", "matched-pairs rank-biserial correlation (Kerby 2014), positive when B > A"},
      {"primary", o.primary},
      {"multiple_comparisons",
       "Holm step-down within the primary family; exploratory statistics carry unadjusted p "
       "and no verdict"},
      {"alpha", o.alpha},
      {"bootstrap", bootstrap_settings(o)}};
}

}  // namespace

nlohmann::ordered_json comparison_to_json(const Comparison& c) {
  json metrics = json::array();
  for (const auto& m : c.metrics) metrics.push_back(metric_to_json(m, c.options));
  json pairs = json::array();
  for (const auto& p : c.pairs) pairs.push_back(pair_to_json(p, c.metrics));
  json unpaired = json::array();
  for (const auto& u : c.unpaired)
    unpaired.push_back({{"side", u.side},
                        {"key", u.key},
                        {"reports", report_paths(u.clips)},
                        {"reason", u.reason}});
  json failed = json::array();
  for (const auto& f : c.failed)
    failed.push_back({{"side", f.side}, {"path", f.path}, {"error", f.error}});
  return {
      {"schema", kCompareSchema},
      {"tool", {{"name", "clipwarden"}, {"version", version()}}},
      {"inputs",
       {{"a", c.a_dir}, {"b", c.b_dir}, {"a_clips", c.a_clip_count}, {"b_clips", c.b_clip_count}}},
      {"pair_by", to_string(c.pair_by)},
      {"differences", "B - A"},
      {"aggregation",
       "clips that share a key on one side (several seeds of a prompt) are averaged per "
       "statistic before pairing, so each key counts once"},
      {"averaged", c.averaged},
      {"most_clips_per_key", c.most_clips_per_key},
      {"settings", settings_to_json(c)},
      {"headline", c.headline},
      {"design", design_to_json(c.design)},
      {"verdicts", verdicts_to_json(c.verdicts)},
      {"metrics", std::move(metrics)},
      {"pairs", std::move(pairs)},
      {"unpaired", std::move(unpaired)},
      {"failed", std::move(failed)}};
}

Status write_comparison(const Comparison& c, const std::string& out_dir) {
  std::error_code ec;
  std::filesystem::create_directories(out_dir, ec);
  if (ec) return output_error(out_dir, "cannot create output folder: " + ec.message());
  const std::string base = (std::filesystem::path(out_dir) / "compare").string();
  if (auto s = write_file_atomic(base + ".json", dump_json(comparison_to_json(c), 1) + "\n"); !s)
    return s;
  return write_file_atomic(base + ".html", comparison_to_html(c, out_dir));
}

}  // namespace clipwarden
