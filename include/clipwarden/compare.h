// Comparing two model versions on the same prompts: two folders of per-clip
// reports (or two gate output folders) are paired clip by clip, and every
// compared statistic gets a paired test, an interval and a verdict.
// Written as DIR/compare.json (schema "clipwarden.compare/1") and a
// self-contained DIR/compare.html.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "clipwarden/error.h"

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
  double alpha = 0.05;  // family-wise error rate, Holm across all compared statistics
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
  nlohmann::json seed;  // as given in the queue line, null if none
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

struct MetricComparison {
  ComparedStatistic what;
  int n = 0;  // pairs where both sides have a value
  int n_nonzero = 0;
  double mean_diff = 0;  // B - A
  double median_diff = 0;
  double ci_low = 0;  // BCa interval of mean_diff; NaN when n < 2
  double ci_high = 0;
  double p_value = 1;  // two-sided Wilcoxon signed-rank
  double p_holm = 1;
  double effect_size = 0;  // matched-pairs rank-biserial, positive when B > A
  int wins_a = 0;          // pairs where A is better in the metric's direction
  int wins_b = 0;
  int ties = 0;
  std::string better = "neither";  // "a", "b" or "neither"
  std::string test = "none";       // "exact", "normal" or "none"
  bool in_holm_family = false;
};

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

// Keys in reading order (schema, tool, inputs, ..., metrics, pairs, unpaired, failed).
nlohmann::ordered_json comparison_to_json(const Comparison& comparison);
// The page for out_dir (links to the clips' reports are relative to it).
std::string comparison_to_html(const Comparison& comparison, const std::string& out_dir);
// Creates out_dir and writes compare.json and compare.html atomically.
Status write_comparison(const Comparison& comparison, const std::string& out_dir);

}  // namespace clipwarden
