// Pairing the clips of A and B and testing every compared statistic.
#include <algorithm>
#include <cmath>
#include <limits>
#include <map>

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

// Coherence first, then each metric's chosen summary statistics, then the
// segment counts; only statistics that both sides have, and no descriptive
// column (see metric_direction.h).
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
        if (metric != "coherence" &&
            std::find(metrics.begin(), metrics.end(), metric) == metrics.end())
          metrics.push_back(metric);
      }
  };
  for (const auto& p : pairs) note(p.a, 1), note(p.b, 2);
  std::vector<ComparedStatistic> out;
  auto add = [&](const std::string& metric, const std::string& statistic) {
    if (sides[metric + "." + statistic] == 3) out.push_back(describe(metric, statistic));
  };
  add("coherence", "score");
  for (const auto& m : metrics)
    for (const auto& s : options.statistics) add(m, s);
  for (const auto& m : metrics) add(m, "segment_count");
  return out;
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
  // A statistic without a single non-zero difference cannot be rejected at
  // any level; leaving it out of the Holm family costs the others nothing
  // and keeps the family-wise error rate (the argument of Tarone 1990,
  // Biometrics 46:1171-1176, for tests that cannot reach significance).
  m.in_holm_family = test.method_used != stats::TestMethod::none;
  return m;
}

void adjust_and_decide(std::vector<MetricComparison>& metrics, double alpha) {
  std::vector<double> p;
  for (const auto& m : metrics) p.push_back(m.in_holm_family ? m.p_value : kNaN);
  const auto holm = stats::holm_adjust(p);
  for (size_t i = 0; i < metrics.size(); ++i) {
    auto& m = metrics[i];
    m.p_holm = m.in_holm_family ? holm[i] : 1.0;
    if (!(m.p_holm < alpha) || m.effect_size == 0) continue;
    const bool b_larger = m.effect_size > 0;
    m.better = b_larger == m.what.higher_is_better ? "b" : "a";
  }
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
  adjust_and_decide(c.metrics, options.alpha);
  return c;
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
