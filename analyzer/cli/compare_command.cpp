// clipwarden compare A B --out DIR: two model versions on the same prompts.
#include <algorithm>
#include <charconv>
#include <cstdio>

#include "analyzer/cli/args.h"
#include "analyzer/cli/command.h"
#include "clipwarden/compare.h"

namespace clipwarden::cli {
namespace {

const char* kCompareDescription =
    "Compares two folders of per-clip reports (clipwarden analyze output, or gate output folders\n"
    "with queue.jsonl) clip by clip and writes DIR/compare.json and DIR/compare.html.\n"
    "Clips are paired by --pair-by (default: prompt_id when every queue line has one, else the\n"
    "report name); several clips per key on one side (seeds) are averaged per key first.\n"
    "Compared: the coherence score, the share of clips passing and rejected, the chosen summary\n"
    "statistics of each per-frame metric (default p95) and segment counts, each with a two-sided\n"
    "Wilcoxon signed-rank test, the exact sign test and a BCa bootstrap interval of the mean\n"
    "difference B - A. The primary family (default: coherence and verdict; --primary names\n"
    "others, and every --fail-if-worse statistic joins it) decides the headline, Holm-adjusted\n"
    "within it; the rest is exploratory (unadjusted p, no verdict).\n"
    "METRIC is a metric (flicker: its summary statistics, not its segment count) or\n"
    "metric.statistic / metric:statistic (flicker:p95, coherence.score, drift.segment_count).\n"
    "Exit status: 0 done, 1 B is significantly worse on a --fail-if-worse metric, 2 bad usage\n"
    "(also: no clip pairs up, or METRIC was not compared), 3 an input could not be read\n"
    "(outranks 1).";

std::vector<OptionSpec> compare_specs() {
  return {
      {"out", true, "output folder for compare.json and compare.html (required)"},
      {"pair-by", true, "id, prompt_id or name (default: prompt_id if known, else name)"},
      {"stat", true, "summary statistic per metric: mean, p50, p95, max (default p95; repeatable)",
       "", true},
      {"primary", true,
       "METRIC[:STAT] in the primary family instead of coherence and verdict (repeatable)", "",
       true},
      {"fail-if-worse", true,
       "exit 1 when B is significantly worse on METRIC; it joins the primary family (repeatable)",
       "", true},
      {"zero-rule", true, "zero differences: wilcox (drop, default), pratt or zsplit"},
      {"resamples", true, "bootstrap resamples (default 10000)"},
      {"seed", true, "bootstrap seed (default 20240607)"},
      {"quiet", false, "print nothing but errors"},
  };
}

Expected<CompareOptions> options_from_args(const ParsedArgs& args) {
  CompareOptions o;
  if (auto p = args.get("pair-by")) {
    auto by = pair_by_from_string(*p);
    if (!by) return usage_error("--pair-by", "expects id, prompt_id or name, got '" + *p + "'");
    o.pair_by = *by;
  }
  if (args.has("stat")) {
    o.statistics.clear();
    for (const auto& s : args.get_all("stat"))
      if (std::find(o.statistics.begin(), o.statistics.end(), s) == o.statistics.end())
        o.statistics.push_back(s);
  }
  if (args.has("primary")) o.primary = args.get_all("primary");
  for (const auto& name : args.get_all("fail-if-worse"))
    if (std::find(o.primary.begin(), o.primary.end(), name) == o.primary.end())
      o.primary.push_back(name);
  if (auto z = args.get("zero-rule")) {
    auto rule = zero_rule_from_string(*z);
    if (!rule)
      return usage_error("--zero-rule", "expects wilcox, pratt or zsplit, got '" + *z + "'");
    o.zero_rule = *rule;
  }
  auto resamples = args.get_int("resamples", 100, 1000000);
  if (!resamples) return resamples.error();
  if (*resamples) o.bootstrap_resamples = **resamples;
  if (auto s = args.get("seed")) {
    auto [end, ec] = std::from_chars(s->data(), s->data() + s->size(), o.bootstrap_seed);
    if (ec != std::errc() || end != s->data() + s->size())
      return usage_error("--seed", "expects a whole number from 0 to 2^64-1, got '" + *s + "'");
  }
  return o;
}

void print_summary(const Comparison& c, const std::string& out_dir) {
  std::printf("compare: %zu keys paired by %s (A %d clips, B %d clips)\n", c.pairs.size(),
              to_string(c.pair_by), c.a_clip_count, c.b_clip_count);
  for (const auto& sentence : c.headline) std::printf("  %s\n", sentence.c_str());
  if (!c.unpaired.empty())
    std::printf("  %zu unpaired key(s), listed in compare.json\n", c.unpaired.size());
  std::printf("  wrote %s/compare.json and %s/compare.html\n", out_dir.c_str(), out_dir.c_str());
}

}  // namespace

int run_compare(const std::vector<std::string>& args) {
  const auto specs = compare_specs();
  int stop_status = kExitOk;
  auto parsed = parse_command_line(
      args, specs, {"compare", "A B --out DIR [options]", kCompareDescription}, stop_status);
  if (!parsed) return stop_status;
  if (parsed->positionals.size() != 2) {
    print_error("compare takes two folders, A and B (see clipwarden compare --help)");
    return kExitUsage;
  }
  const auto out_dir = parsed->get("out");
  if (!out_dir) {
    print_error("compare needs --out DIR (see clipwarden compare --help)");
    return kExitUsage;
  }
  auto options = options_from_args(*parsed);
  if (!options) {
    print_error(options.error().message());
    return kExitUsage;
  }
  auto comparison =
      compare_report_folders(parsed->positionals[0], parsed->positionals[1], *options);
  if (!comparison) {
    print_error(comparison.error().message());
    return comparison.error().kind == ErrorKind::usage ? kExitUsage : kExitInputError;
  }
  const Comparison& c = *comparison;
  for (const auto& f : c.failed)
    print_error((f.side == "a" ? "A: " : "B: ") + f.path + ": " + f.error);

  int status = kExitOk;
  // Unknown names were refused by compare_report_folders (they are in the
  // primary family).
  for (const auto& name : parsed->get_all("fail-if-worse"))
    for (const MetricComparison* m : c.worse_in_b())
      if (m->what.named_by(name)) status = kExitGateFailed;
  if (auto written = write_comparison(c, *out_dir); !written) {
    print_error(written.error().message());
    return kExitInputError;
  }
  if (!parsed->has("quiet")) print_summary(c, *out_dir);
  if (c.any_unreadable()) return kExitInputError;
  if (c.pairs.empty()) {
    print_error(std::string("no clip of A pairs with a clip of B by ") + to_string(c.pair_by) +
                " (try --pair-by)");
    return kExitUsage;
  }
  return status;
}

}  // namespace clipwarden::cli
