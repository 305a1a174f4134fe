// Pairing the prompts of A and B and testing every compared statistic: the
// primary family with Holm, the rest exploratory; the sign test, seed spread,
// verdict table and what the number of prompts can show.
#include <algorithm>
#include <array>
#include <cmath>
#include <limits>
#include <map>

#include "analyzer/compare/binomial_tests.h"
#include "analyzer/compare/metric_direction.h"
#include "analyzer/compare/paired_stats.h"
#include "analyzer/compare/report_folder.h"
#include "clipwarden/compare.h"

namespace clipwarden {
namespace {

using compare_detail::LoadedFolder;
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
const std::vector<std::string> kSummaryStatistics = {"mean", "p50", "p95", "max"};

Status check_options(const CompareOptions& o) {
  if (o.statistics.empty()) return usage_error("--stat", "names no statistic");
  for (const auto& s : o.statistics)
    if (std::find(kSummaryStatistics.begin(), kSummaryStatistics.end(), s) ==
        kSummaryStatistics.end())
      return usage_error("--stat", "expects mean, p50, p95 or max, got '" + s + "'");
  if (o.bootstrap_resamples < 100 || o.bootstrap_resamples > 1000000)
    return usage_error("--resamples", "expects a whole number from 100 to 1000000");
  if (!(o.confidence_level > 0 && o.confidence_level < 1))
    return usage_error("confidence_level", "must lie strictly between 0 and 1");
  if (!(o.alpha > 0 && o.alpha < 1))
    return usage_error("alpha", "must lie strictly between 0 and 1");
  if (o.primary.empty()) return usage_error("--primary", "names no statistic");
  return Ok{};
}

PairBy resolve_pair_by(PairBy requested, const LoadedFolder& a, const LoadedFolder& b) {
  if (requested != PairBy::automatic) return requested;
  auto all_have_prompt = [](const LoadedFolder& f) {
    return f.from_queue && !f.clips.empty() &&
           std::all_of(f.clips.begin(), f.clips.end(),
                       [](const ClipEntry& c) { return c.prompt_id.has_value(); });
  };
  return all_have_prompt(a) && all_have_prompt(b) ? PairBy::prompt_id : PairBy::name;
}

std::optional<std::string> key_of(const ClipEntry& c, PairBy by) {
  switch (by) {
    case PairBy::id:
      return c.id;
    case PairBy::prompt_id:
      return c.prompt_id;
    default:
      return c.name;
  }
}

// Clips grouped by key, keys in order of first appearance; clips without a
// key become unpaired right away.
using Groups = std::vector<std::pair<std::string, std::vector<ClipEntry>>>;
Groups group_by_key(const std::vector<ClipEntry>& clips, PairBy by, const std::string& side,
                    std::vector<UnpairedClips>& unpaired) {
  Groups groups;
  std::map<std::string, size_t> index;
  for (const auto& c : clips) {
    const auto key = key_of(c, by);
    if (!key) {
      unpaired.push_back(
          {side, "", {c}, std::string("has no ") + to_string(by) + " in queue.jsonl"});
      continue;
    }
    auto [it, fresh] = index.emplace(*key, groups.size());
    if (fresh) groups.push_back({*key, {}});
    groups[it->second].second.push_back(c);
  }
  return groups;
}

double value_of(const ClipEntry& c, const std::string& key) {
  for (const auto& [k, v] : c.values)
    if (k == key) return v;
  return kNaN;
}

// The mean over the clips that have the value (several seeds of a prompt).
double averaged(const std::vector<ClipEntry>& clips, const std::string& key) {
  double sum = 0;
  int n = 0;
  for (const auto& c : clips)
    if (double v = value_of(c, key); std::isfinite(v)) sum += v, ++n;
  return n ? sum / n : kNaN;
}

ComparedStatistic describe(const std::string& metric, const std::string& statistic) {
  if (metric == "verdict")  // shares of a prompt's clips at a verdict
    return statistic == "pass_share" ? ComparedStatistic{metric, statistic, true,
                                                         "higher share of clips passing is better"}
                                     : ComparedStatistic{metric, statistic, false,
                                                         "lower share of clips rejected is better"};
  ComparedStatistic s{
      metric, statistic,
      compare_detail::direction_of(metric) == compare_detail::Direction::higher_is_better, ""};
  if (s.higher_is_better)
    s.direction = "higher " + metric + " is better";
  else if (statistic == "segment_count")
    s.direction = "fewer " + metric + " segments is better";
  else
    s.direction = "lower " + metric + " " + statistic + " is better";
  return s;
}

// The summary statistic a primary name asks for explicitly, when --stat did
// not choose it ("flicker:max" compares flicker.max too).
std::vector<std::pair<std::string, std::string>> statistics_named_by(
    const std::vector<std::string>& names) {
  std::vector<std::pair<std::string, std::string>> out;
  for (const auto& name : names) {
    const auto sep = name.find_first_of(".:");
    if (sep == std::string::npos) continue;
    const std::string statistic = name.substr(sep + 1);
    if (std::find(kSummaryStatistics.begin(), kSummaryStatistics.end(), statistic) !=
        kSummaryStatistics.end())
      out.emplace_back(name.substr(0, sep), statistic);
  }
  return out;
}

// Coherence first, then the verdict shares, each metric's chosen summary
// statistics, then the segment counts; only statistics that both sides have,
// and no descriptive column (see metric_direction.h).
std::vector<ComparedStatistic> compared_statistics(const std::vector<PairedKey>& pairs,
                                                   const CompareOptions& options) {
  std::vector<std::string> metrics;
  std::map<std::string, int> sides;  // bit 1: A has it, bit 2: B has it
  auto note = [&](const std::vector<ClipEntry>& clips, int bit) {
    for (const auto& c : clips)
      for (const auto& [key, v] : c.values) {
        sides[key] |= bit;
        const std::string metric = key.substr(0, key.rfind('.'));
        if (compare_detail::direction_of(metric) == compare_detail::Direction::descriptive)
          continue;
        if (metric != "coherence" && metric != "verdict" &&
            std::find(metrics.begin(), metrics.end(), metric) == metrics.end())
          metrics.push_back(metric);
      }
  };
  for (const auto& p : pairs) note(p.a, 1), note(p.b, 2);
  std::vector<ComparedStatistic> out;
  auto add = [&](const std::string& metric, const std::string& statistic) {
    const bool listed = std::any_of(out.begin(), out.end(), [&](const ComparedStatistic& s) {
      return s.metric == metric && s.statistic == statistic;
    });
    if (sides[metric + "." + statistic] == 3 && !listed) out.push_back(describe(metric, statistic));
  };
  add("coherence", "score");
  add("verdict", "pass_share");
  add("verdict", "reject_share");
  const auto extra = statistics_named_by(options.primary);
  for (const auto& m : metrics) {
    for (const auto& s : options.statistics) add(m, s);
    for (const auto& [metric, s] : extra)
      if (metric == m && std::find(options.statistics.begin(), options.statistics.end(), s) ==
                             options.statistics.end())
        add(m, s);
  }
  for (const auto& m : metrics) add(m, "segment_count");
  return out;
}

// The values of one side's clips of a prompt that have the statistic.
std::vector<double> clip_values(const std::vector<ClipEntry>& clips, const std::string& key) {
  std::vector<double> out;
  for (const auto& c : clips)
    if (double v = value_of(c, key); std::isfinite(v)) out.push_back(v);
  return out;
}

double sample_variance(const std::vector<double>& v) {
  const double mean = stats::mean_of(v);
  double sum = 0;
  for (double x : v) sum += (x - mean) * (x - mean);
  return sum / static_cast<double>(v.size() - 1);
}

// Seed-to-seed spread: each side's within-prompt variance pooled over the
// prompts with two or more clips (weights k - 1, the usual pooled estimate),
// and the variance of a prompt's difference of means that seed sampling
// alone gives, s_a^2 / k_a + s_b^2 / k_b, averaged over the prompts.
void add_seed_spread(MetricComparison& m, const std::vector<PairedKey>& pairs) {
  double sum[2] = {0, 0}, df[2] = {0, 0};
  std::vector<std::array<double, 2>> counts;  // clips per prompt with the value, A and B
  for (const auto& p : pairs) {
    const auto a = clip_values(p.a, m.what.key()), b = clip_values(p.b, m.what.key());
    if (a.empty() || b.empty()) continue;
    counts.push_back({static_cast<double>(a.size()), static_cast<double>(b.size())});
    int side = 0;
    for (const auto* v : {&a, &b}) {
      if (v->size() >= 2) {
        sum[side] += sample_variance(*v) * static_cast<double>(v->size() - 1);
        df[side] += static_cast<double>(v->size() - 1);
      }
      ++side;
    }
  }
  if (df[0] > 0) m.seed_sd_a = std::sqrt(sum[0] / df[0]);
  if (df[1] > 0) m.seed_sd_b = std::sqrt(sum[1] / df[1]);
  if (df[0] == 0 || df[1] == 0 || counts.empty()) return;
  double noise = 0;
  for (const auto& k : counts) noise += sum[0] / df[0] / k[0] + sum[1] / df[1] / k[1];
  m.seed_noise = std::sqrt(noise / static_cast<double>(counts.size()));
}

// The sign test and the share of changed prompts where B is better.
void add_sign_test(MetricComparison& m, double confidence_level) {
  const int changed = m.wins_a + m.wins_b;
  m.sign_p_value = stats::binomial_test_half(m.wins_b, changed);
  if (changed == 0) return;
  m.b_better_share = static_cast<double>(m.wins_b) / changed;
  const auto ci = stats::clopper_pearson(m.wins_b, changed, confidence_level);
  m.b_better_low = ci.low;
  m.b_better_high = ci.high;
}

MetricComparison test_statistic(const ComparedStatistic& what, const std::vector<PairedKey>& pairs,
                                size_t column, const CompareOptions& o) {
  MetricComparison m;
  m.what = what;
  std::vector<double> d;
  for (const auto& p : pairs) {
    const double a = p.a_values[column], b = p.b_values[column];
    if (!std::isfinite(a) || !std::isfinite(b)) continue;
    d.push_back(b - a);
    if (a == b)
      ++m.ties;
    else if ((b > a) == what.higher_is_better)
      ++m.wins_b;
    else
      ++m.wins_a;
  }
  m.n = static_cast<int>(d.size());
  m.n_nonzero = m.wins_a + m.wins_b;
  m.mean_diff = stats::mean_of(d);
  m.median_diff = stats::median_of(d);
  const auto ci = stats::bca_interval_of_mean(
      d, stats::BootstrapOptions{o.bootstrap_resamples, o.bootstrap_seed, o.confidence_level});
  m.ci_low = ci.low;
  m.ci_high = ci.high;
  stats::WilcoxonOptions w;
  w.zero_method = o.zero_rule == ZeroRule::pratt    ? stats::ZeroMethod::pratt
                  : o.zero_rule == ZeroRule::zsplit ? stats::ZeroMethod::zsplit
                                                    : stats::ZeroMethod::wilcox;
  const auto test = stats::wilcoxon_signed_rank(d, w);
  m.p_value = test.p_value;
  m.effect_size = stats::rank_biserial(test);
  m.test = test.method_used == stats::TestMethod::exact    ? "exact"
           : test.method_used == stats::TestMethod::normal ? "normal"
                                                           : "none";
  add_sign_test(m, o.confidence_level);
  add_seed_spread(m, pairs);
  m.primary = std::any_of(o.primary.begin(), o.primary.end(),
                          [&](const std::string& name) { return what.named_by(name); });
  // A statistic without a single non-zero difference cannot be rejected at
  // any level; leaving it out of the Holm family costs the others nothing
  // and keeps the family-wise error rate (the argument of Tarone 1990,
  // Biometrics 46:1171-1176, for tests that cannot reach significance).
  m.in_holm_family = m.primary && test.method_used != stats::TestMethod::none;
  return m;
}

// "a" or "b": the side the effect favours, in the statistic's direction.
const char* favoured_side(const MetricComparison& m) {
  return (m.effect_size > 0) == m.what.higher_is_better ? "b" : "a";
}

// Holm within the primary family only; exploratory statistics keep their
// unadjusted p and get no verdict.
void adjust_and_decide(std::vector<MetricComparison>& metrics, double alpha) {
  std::vector<double> p;
  for (const auto& m : metrics) p.push_back(m.in_holm_family ? m.p_value : kNaN);
  const auto holm = stats::holm_adjust(p);
  for (size_t i = 0; i < metrics.size(); ++i) {
    auto& m = metrics[i];
    m.p_holm = m.in_holm_family ? holm[i] : m.primary ? 1.0 : kNaN;
    if (m.effect_size == 0) continue;
    if (m.p_value < alpha) m.unadjusted_better = favoured_side(m);
    if (m.p_holm < alpha) m.better = favoured_side(m);
  }
}

// A prompt passes on a side when more than half of its clips pass.
bool prompt_passes(const std::vector<ClipEntry>& clips) {
  const auto passing = std::count_if(clips.begin(), clips.end(),
                                     [](const ClipEntry& c) { return c.verdict == Verdict::pass; });
  return 2 * passing > static_cast<long>(clips.size());
}

VerdictComparison compare_verdicts(const std::vector<PairedKey>& pairs) {
  VerdictComparison v;
  for (const auto& p : pairs) {
    for (const auto& c : p.a) ++v.clips_a[static_cast<size_t>(c.verdict)];
    for (const auto& c : p.b) ++v.clips_b[static_cast<size_t>(c.verdict)];
    const bool a = prompt_passes(p.a), b = prompt_passes(p.b);
    (a && b ? v.both_pass : a ? v.only_a_pass : b ? v.only_b_pass : v.neither_pass) += 1;
  }
  // McNemar's exact test: under no change, each discordant prompt is as
  // likely to pass only in A as only in B (McNemar 1947, Psychometrika
  // 12:153-157; the exact form is the binomial test on the discordant pairs).
  const int discordant = v.only_a_pass + v.only_b_pass;
  if (discordant > 0) {
    v.p_value = stats::binomial_test_half(v.only_b_pass, discordant);
    v.test = "exact";
  }
  return v;
}

void pair_groups(const Groups& a, const Groups& b, Comparison& c) {
  std::map<std::string, size_t> b_index;
  for (size_t i = 0; i < b.size(); ++i) b_index[b[i].first] = i;
  std::vector<bool> b_used(b.size(), false);
  for (const auto& [key, clips] : a) {
    auto it = b_index.find(key);
    if (it == b_index.end()) {
      c.unpaired.push_back({"a", key, clips, "no clip with this key in B"});
      continue;
    }
    b_used[it->second] = true;
    c.pairs.push_back({key, clips, b[it->second].second, {}, {}});
    if (clips.size() > 1 || b[it->second].second.size() > 1) c.averaged = true;
  }
  for (size_t i = 0; i < b.size(); ++i)
    if (!b_used[i])
      c.unpaired.push_back({"b", b[i].first, b[i].second, "no clip with this key in A"});
}

}  // namespace

Expected<Comparison> compare_report_folders(const std::string& a_dir, const std::string& b_dir,
                                            const CompareOptions& options) {
  if (auto ok = check_options(options); !ok) return ok.error();
  auto a = compare_detail::load_report_folder(a_dir, "a");
  if (!a) return a.error();
  auto b = compare_detail::load_report_folder(b_dir, "b");
  if (!b) return b.error();

  Comparison c;
  c.a_dir = a_dir;
  c.b_dir = b_dir;
  c.options = options;
  c.pair_by = resolve_pair_by(options.pair_by, *a, *b);
  c.a_clip_count = static_cast<int>(a->clips.size());
  c.b_clip_count = static_cast<int>(b->clips.size());
  c.failed = a->failed;
  c.failed.insert(c.failed.end(), b->failed.begin(), b->failed.end());
  const Groups a_groups = group_by_key(a->clips, c.pair_by, "a", c.unpaired);
  const Groups b_groups = group_by_key(b->clips, c.pair_by, "b", c.unpaired);
  pair_groups(a_groups, b_groups, c);

  const auto statistics = compared_statistics(c.pairs, options);
  for (auto& p : c.pairs)
    for (const auto& s : statistics) {
      p.a_values.push_back(averaged(p.a, s.key()));
      p.b_values.push_back(averaged(p.b, s.key()));
    }
  for (size_t i = 0; i < statistics.size(); ++i)
    c.metrics.push_back(test_statistic(statistics[i], c.pairs, i, options));
  if (!c.pairs.empty())
    for (const auto& name : options.primary)
      if (std::none_of(statistics.begin(), statistics.end(),
                       [&](const ComparedStatistic& s) { return s.named_by(name); }))
        return usage_error("primary family",
                           "'" + name + "' names no statistic both sides have (see --help)");
  adjust_and_decide(c.metrics, options.alpha);
  const auto family = std::count_if(c.metrics.begin(), c.metrics.end(),
                                    [](const MetricComparison& m) { return m.primary; });
  c.design =
      design_limits_for(static_cast<int>(c.pairs.size()), static_cast<int>(family), options.alpha);
  c.verdicts = compare_verdicts(c.pairs);
  for (const auto& p : c.pairs)
    c.most_clips_per_key = std::max(
        {c.most_clips_per_key, static_cast<int>(p.a.size()), static_cast<int>(p.b.size())});
  c.headline = headline_sentences(c);
  return c;
}

DesignLimits design_limits_for(int prompts, int family, double alpha) {
  DesignLimits d;
  d.prompts = prompts;
  d.primary_family = family;
  d.smallest_p = stats::smallest_two_sided_p(prompts);
  d.smallest_holm_p = std::min(1.0, std::max(family, 1) * d.smallest_p);
  d.single_test_can_reach = d.smallest_p < alpha;
  d.primary_can_reach = d.smallest_holm_p < alpha;
  auto needed = [&](int m) {
    int n = 1;
    while (m * stats::smallest_two_sided_p(n) >= alpha) ++n;
    return n;
  };
  d.prompts_needed_single = needed(1);
  d.prompts_needed_primary = needed(std::max(family, 1));
  return d;
}

bool ComparedStatistic::named_by(const std::string& name) const {
  const auto sep = name.find_first_of(".:");
  if (sep == std::string::npos) return name == metric && statistic != "segment_count";
  return name.compare(0, sep, metric) == 0 && sep == metric.size() &&
         name.compare(sep + 1, std::string::npos, statistic) == 0;
}

std::vector<const MetricComparison*> Comparison::worse_in_b() const {
  std::vector<const MetricComparison*> out;
  for (const auto& m : metrics)
    if (m.better == "a") out.push_back(&m);
  return out;
}

bool Comparison::any_unreadable() const {
  return std::any_of(failed.begin(), failed.end(),
                     [](const FailedInput& f) { return f.unreadable; });
}

const char* to_string(PairBy p) {
  switch (p) {
    case PairBy::automatic:
      return "automatic";
    case PairBy::id:
      return "id";
    case PairBy::prompt_id:
      return "prompt_id";
    case PairBy::name:
      return "name";
  }
  return "name";
}

std::optional<PairBy> pair_by_from_string(const std::string& s) {
  for (PairBy p : {PairBy::id, PairBy::prompt_id, PairBy::name})
    if (s == to_string(p)) return p;
  return std::nullopt;
}

const char* to_string(ZeroRule z) {
  return z == ZeroRule::pratt ? "pratt" : z == ZeroRule::zsplit ? "zsplit" : "wilcox";
}

std::optional<ZeroRule> zero_rule_from_string(const std::string& s) {
  for (ZeroRule z : {ZeroRule::wilcox, ZeroRule::pratt, ZeroRule::zsplit})
    if (s == to_string(z)) return z;
  return std::nullopt;
}

}  // namespace clipwarden
