// Comparing two model versions on the same prompts: two folders of per-clip
// reports (or two gate output folders) are paired prompt by prompt. A small
// primary family of statistics decides the headline (Holm-adjusted within
// it); every other statistic is exploratory: shown with its effect size,
// interval and unadjusted p, never a verdict.
// Written as DIR/compare.json (schema "clipwarden.compare/1") and a
// self-contained DIR/compare.html.
#pragma once

#include <array>
#include <cstdint>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "clipwarden/error.h"
#include "clipwarden/report.h"

namespace clipwarden {

inline constexpr const char* kCompareSchema = "clipwarden.compare/1";

// How clips of A and B are matched. automatic: prompt_id when both inputs
// are gate folders whose queue lines all carry one, else name.
enum class PairBy { automatic, id, prompt_id, name };
const char* to_string(PairBy p);
std::optional<PairBy> pair_by_from_string(const std::string& s);

// Zero differences in the signed-rank test: wilcox drops them (default),
// pratt ranks then drops them, zsplit splits their ranks between the signs.
enum class ZeroRule { wilcox, pratt, zsplit };
const char* to_string(ZeroRule z);
std::optional<ZeroRule> zero_rule_from_string(const std::string& s);

struct CompareOptions {
  PairBy pair_by = PairBy::automatic;
  // Summary statistics compared for each per-frame metric: mean, p50, p95,
  // max. The coherence score and segment counts are always compared.
  std::vector<std::string> statistics = {"p95"};
  ZeroRule zero_rule = ZeroRule::wilcox;
  int bootstrap_resamples = 10000;
  uint64_t bootstrap_seed = 20240607;
  double confidence_level = 0.95;
  double alpha = 0.05;  // family-wise error rate, Holm within the primary family
  // The primary family: the statistics that decide the headline. A name is
  // a metric (every compared statistic of it except its segment count) or
  // one statistic, "metric.statistic" or "metric:statistic". "verdict" is
  // the share of a prompt's clips that pass and the share rejected.
  std::vector<std::string> primary = {"coherence", "verdict"};
};

// One clip's report on one side.
struct ClipEntry {
  std::string report_path;  // the .json as found (queue paths resolved against the folder)
  std::string page_path;    // the .html beside it when it exists, else the .json
  std::string id;           // queue id, else the report file name without .json
  std::string name;         // the report file name without .json
  std::string clip_path;    // the analysed clip
  std::optional<std::string> prompt_id;
  std::optional<std::string> model;
  nlohmann::json seed;              // as given in the queue line, null if none
  Verdict verdict = Verdict::pass;  // the report's verdict
  // Every comparable value of this clip, keyed "metric.statistic" (e.g.
  // "flicker.p95", "coherence.score", "drift.segment_count").
  std::vector<std::pair<std::string, double>> values;
};

// What one compared statistic means; the key is metric + "." + statistic.
struct ComparedStatistic {
  std::string metric;
  std::string statistic;
  bool higher_is_better = false;
  std::string direction;  // in words, e.g. "lower flicker p95 is better"
  std::string key() const { return metric + "." + statistic; }
  // Whether a --primary / --fail-if-worse name covers this statistic: a
  // metric covers all its statistics but the segment count; "m.s" and "m:s"
  // name one.
  bool named_by(const std::string& name) const;
};

// The clips of A and B that share a key; clips sharing a key on one side
// (several seeds) are averaged per statistic before pairing.
struct PairedKey {
  std::string key;
  std::vector<ClipEntry> a;
  std::vector<ClipEntry> b;
  // Per compared statistic (same order as Comparison::metrics); NaN when a
  // side has no value.
  std::vector<double> a_values;
  std::vector<double> b_values;
};

struct UnpairedClips {
  std::string side;  // "a" or "b"
  std::string key;   // empty when the clip has no key of the chosen kind
  std::vector<ClipEntry> clips;
  std::string reason;
};

struct FailedInput {
  std::string side;  // "a" or "b"
  std::string path;  // report or queue path
  std::string error;
  bool unreadable =
      false;  // the report could not be read (exit 3), not a gate error recorded upstream
};

inline constexpr double kNotDefined = std::numeric_limits<double>::quiet_NaN();

struct MetricComparison {
  ComparedStatistic what;
  bool primary = false;  // in the primary family (else exploratory)
  int n = 0;             // pairs where both sides have a value
  int n_nonzero = 0;
  double mean_diff = 0;  // B - A
  double median_diff = 0;
  double ci_low = 0;  // BCa interval of mean_diff; NaN when n < 2
  double ci_high = 0;
  double p_value = 1;      // two-sided Wilcoxon signed-rank
  double p_holm = 1;       // primary only; Holm within the primary family
  double effect_size = 0;  // matched-pairs rank-biserial, positive when B > A
  int wins_a = 0;          // pairs where A is better in the metric's direction
  int wins_b = 0;
  int ties = 0;
  // Exact two-sided sign test of wins_b against wins_a (ties left out), and
  // the share of the changed prompts where B is better with its exact
  // Clopper-Pearson interval (NaN when no prompt changed).
  double sign_p_value = 1;
  double b_better_share = kNotDefined;
  double b_better_low = kNotDefined;
  double b_better_high = kNotDefined;
  // The verdict: "a" or "b" when p_holm < alpha (primary statistics only).
  std::string better = "neither";
  // What the unadjusted p alone would say, for every statistic; for an
  // exploratory one this is a lead to follow, not a verdict.
  std::string unadjusted_better = "neither";
  std::string test = "none";  // "exact", "normal" or "none"
  bool in_holm_family = false;
  // Seed-to-seed spread within a prompt: the pooled within-prompt standard
  // deviation on each side (NaN when no prompt has two clips on that side),
  // and the standard deviation one prompt's difference B - A would have
  // from resampling seeds alone, averaged over the prompts.
  double seed_sd_a = kNotDefined;
  double seed_sd_b = kNotDefined;
  double seed_noise = kNotDefined;
};

// Pass vs not pass per prompt (a prompt passes on a side when more than
// half of its clips pass), with McNemar's exact test on the discordant
// prompts, and how many clips each side has at each verdict.
struct VerdictComparison {
  std::array<int, 3> clips_a{};  // pass, review, reject
  std::array<int, 3> clips_b{};
  int both_pass = 0;
  int only_a_pass = 0;  // passes in A, not in B
  int only_b_pass = 0;
  int neither_pass = 0;
  double p_value = 1;         // McNemar exact, two-sided
  std::string test = "none";  // "exact", or "none" when no prompt changed
};

// What the data at hand can show: the exact paired tests cannot go below
// 2 / 2^n for n prompts, and Holm's first step multiplies the smallest p by
// the family size.
struct DesignLimits {
  int prompts = 0;
  int primary_family = 0;      // statistics in the primary family
  double smallest_p = 1;       // 2 / 2^prompts
  double smallest_holm_p = 1;  // primary_family * smallest_p, at most 1
  bool single_test_can_reach = false;
  bool primary_can_reach = false;  // smallest_holm_p < alpha
  int prompts_needed_single = 0;   // fewest prompts where smallest_p < alpha
  int prompts_needed_primary = 0;  // fewest where smallest_holm_p < alpha
};
DesignLimits design_limits_for(int prompts, int primary_family, double alpha);

struct Comparison {
  std::string a_dir;
  std::string b_dir;
  PairBy pair_by = PairBy::name;  // resolved
  CompareOptions options;
  std::vector<MetricComparison> metrics;
  std::vector<PairedKey> pairs;
  std::vector<UnpairedClips> unpaired;
  std::vector<FailedInput> failed;
  int a_clip_count = 0;
  int b_clip_count = 0;
  bool averaged = false;  // some key had several clips on a side
  int most_clips_per_key = 1;
  VerdictComparison verdicts;
  DesignLimits design;
  // The headline in words (headline_sentences), set by
  // compare_report_folders; the terminal, compare.json and the page print it.
  std::vector<std::string> headline;

  // The compared statistics whose better == "a" (B significantly worse).
  std::vector<const MetricComparison*> worse_in_b() const;
  bool any_unreadable() const;
};

// Reads both folders, pairs the clips and computes every statistic. An error
// only when a folder itself cannot be read (missing, not a folder, holding no
// report and no queue.jsonl) or the options are invalid; unreadable reports
// are recorded in Comparison::failed.
Expected<Comparison> compare_report_folders(const std::string& a_dir, const std::string& b_dir,
                                            const CompareOptions& options = {});

// The headline in words, most important first: the primary verdicts, what
// n prompts can show, the exploratory leads, the verdict table, the seeds.
// The terminal, compare.json and the page all print these sentences.
std::vector<std::string> headline_sentences(const Comparison& comparison);

// Keys in reading order (schema, tool, inputs, ..., metrics, pairs, unpaired, failed).
nlohmann::ordered_json comparison_to_json(const Comparison& comparison);
// The page for out_dir (links to the clips' reports are relative to it).
std::string comparison_to_html(const Comparison& comparison, const std::string& out_dir);
// Creates out_dir and writes compare.json and compare.html atomically.
Status write_comparison(const Comparison& comparison, const std::string& out_dir);

}  // namespace clipwarden
