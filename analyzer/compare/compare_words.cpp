// The headline of a comparison in words, shared by the terminal, compare.json
// and the page, so all three say the same thing.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <tuple>

#include "clipwarden/compare.h"

namespace clipwarden {
namespace {

std::string number(double v) {
  if (!std::isfinite(v)) return "n/a";
  char buffer[32];
  std::snprintf(buffer, sizeof buffer, "%.4g", v);
  return buffer;
}

std::string signed_number(double v) { return (std::isfinite(v) && v > 0 ? "+" : "") + number(v); }

std::string p_value(double p) {
  if (!std::isfinite(p)) return "n/a";
  if (p < 1e-4) return "< 0.0001";
  char buffer[32];
  std::snprintf(buffer, sizeof buffer, "%.3g", p);
  return buffer;
}

std::string percent(double share) {
  char buffer[32];
  std::snprintf(buffer, sizeof buffer, "%.0f%%", 100 * share);
  return buffer;
}

std::string count(int n, const char* one, const char* many) {
  return std::to_string(n) + " " + (n == 1 ? one : many);
}

// "coherence score", "share of clips passing", "flicker p95".
std::string name_of(const ComparedStatistic& s) {
  if (s.metric == "coherence" && s.statistic == "score") return "coherence score";
  if (s.key() == "verdict.pass_share") return "share of clips passing";
  if (s.key() == "verdict.reject_share") return "share of clips rejected";
  if (s.statistic == "segment_count") return s.metric + " segment count";
  return s.metric + " " + s.statistic;
}

// "worse in 8 of 8 prompts" in the statistic's own direction, with the rest.
std::string moves(const MetricComparison& m, const std::string& side) {
  const int toward = side == "a" ? m.wins_a : m.wins_b;
  std::string s = std::string(side == "a" ? "worse" : "better") + " in " + std::to_string(toward) +
                  " of " + count(m.n, "prompt", "prompts");
  const int away = side == "a" ? m.wins_b : m.wins_a;
  if (away > 0)
    s += std::string(", ") + (side == "a" ? "better" : "worse") + " in " + std::to_string(away);
  if (m.ties > 0) s += ", unchanged in " + std::to_string(m.ties);
  return s;
}

std::string interval(const MetricComparison& m, double level) {
  return "mean B-A " + signed_number(m.mean_diff) + ", " + percent(level) + " interval " +
         number(m.ci_low) + " to " + number(m.ci_high);
}

std::string sign_test(const MetricComparison& m, double level) {
  if (!std::isfinite(m.b_better_share)) return "no prompt changed";
  return "sign test p " + p_value(m.sign_p_value) + "; B better in " + percent(m.b_better_share) +
         " of the changed prompts, " + percent(level) + " interval " + percent(m.b_better_low) +
         " to " + percent(m.b_better_high);
}

std::string family_names(const Comparison& c) {
  std::string s;
  for (const auto& m : c.metrics)
    if (m.primary) s += (s.empty() ? "" : ", ") + name_of(m.what);
  return s;
}

void primary_sentences(const Comparison& c, std::vector<std::string>& out) {
  const auto& o = c.options;
  std::vector<const MetricComparison*> decided;
  for (const auto& m : c.metrics)
    if (m.primary && m.better != "neither") decided.push_back(&m);
  if (decided.empty()) {
    out.push_back("Primary family (" + family_names(c) +
                  "): no difference survives Holm's adjustment at " + number(o.alpha) + ".");
    return;
  }
  for (const auto* m : decided)
    out.push_back("B is " + std::string(m->better == "a" ? "worse" : "better") + " on the " +
                  name_of(m->what) + ": " + moves(*m, m->better) + " (" +
                  interval(*m, o.confidence_level) + "; Wilcoxon p " + p_value(m->p_value) +
                  ", Holm " + p_value(m->p_holm) + " over the primary family of " +
                  std::to_string(c.design.primary_family) + ").");
}

void design_sentence(const Comparison& c, std::vector<std::string>& out) {
  const auto& d = c.design;
  const double alpha = c.options.alpha;
  std::string s =
      "With " + count(d.prompts, "prompt", "prompts") +
      " the smallest p the exact paired tests (sign test, exact Wilcoxon) can give is " +
      p_value(d.smallest_p) + " (2/2^" + std::to_string(d.prompts) +
      ", every prompt moving the same way)";
  if (!d.single_test_can_reach) {
    s += ", so no test can reach " + number(alpha) + ", not even unadjusted: that needs at least " +
         std::to_string(d.prompts_needed_single) + " prompts, and Holm over the " +
         std::to_string(d.primary_family) + " primary statistics needs " +
         std::to_string(d.prompts_needed_primary) + ".";
  } else if (!d.primary_can_reach) {
    s += "; Holm over the " + std::to_string(d.primary_family) +
         " primary statistics multiplies that to " + p_value(d.smallest_holm_p) +
         ", so no primary result can reach " + number(alpha) +
         " with these prompts: that needs at least " + std::to_string(d.prompts_needed_primary) +
         " prompts (more when the change is small or mixed).";
  } else {
    s += "; Holm over the " + std::to_string(d.primary_family) + " primary statistics can reach " +
         number(alpha) + " (from " + std::to_string(d.prompts_needed_primary) +
         " prompts on when every prompt moves the same way; more for a small or mixed change).";
  }
  out.push_back(s);
}

// Every exploratory statistic whose unadjusted p is below the level, one
// sentence each: summary statistics before segment counts (a count moves in
// whole steps and often repeats what its metric's statistic already says),
// then by p.
void lead_sentences(const Comparison& c, std::vector<std::string>& out) {
  std::vector<const MetricComparison*> leads;
  for (const auto& m : c.metrics)
    if (!m.primary && m.unadjusted_better != "neither") leads.push_back(&m);
  auto order = [](const MetricComparison* m) {
    return std::tuple(m->what.statistic == "segment_count", m->p_value, m->sign_p_value);
  };
  std::stable_sort(leads.begin(), leads.end(),
                   [&](auto* x, auto* y) { return order(x) < order(y); });
  for (const auto* lead : leads) {
    const auto& m = *lead;
    out.push_back(
        "Exploratory, unadjusted (a lead, not a verdict): B " + moves(m, m.unadjusted_better) +
        " on " + name_of(m.what) + " (" + sign_test(m, c.options.confidence_level) + "; " +
        interval(m, c.options.confidence_level) + "; Wilcoxon p " + p_value(m.p_value) + ").");
  }
}

void verdict_sentence(const Comparison& c, std::vector<std::string>& out) {
  const auto& v = c.verdicts;
  const int prompts = v.both_pass + v.only_a_pass + v.only_b_pass + v.neither_pass;
  if (prompts == 0) return;
  std::string s = "Verdicts per prompt: passing in A " +
                  std::to_string(v.both_pass + v.only_a_pass) + " of " + std::to_string(prompts) +
                  ", in B " + std::to_string(v.both_pass + v.only_b_pass) + "; " +
                  std::to_string(v.only_a_pass) + " pass only in A, " +
                  std::to_string(v.only_b_pass) + " only in B";
  s += v.test == "exact" ? " (McNemar exact p " + p_value(v.p_value) + ")." : ".";
  s += " Clips pass/review/reject: A " + std::to_string(v.clips_a[0]) + "/" +
       std::to_string(v.clips_a[1]) + "/" + std::to_string(v.clips_a[2]) + ", B " +
       std::to_string(v.clips_b[0]) + "/" + std::to_string(v.clips_b[1]) + "/" +
       std::to_string(v.clips_b[2]) + ".";
  out.push_back(s);
}

void seed_sentences(const Comparison& c, std::vector<std::string>& out) {
  if (c.most_clips_per_key < 2) return;
  out.push_back("Up to " + std::to_string(c.most_clips_per_key) +
                " clips per prompt (seeds) were averaged per prompt before testing; the prompt "
                "is the unit.");
  for (const auto& m : c.metrics) {
    if (!(m.primary || m.unadjusted_better != "neither") || !std::isfinite(m.seed_noise)) continue;
    const double ratio = std::fabs(m.mean_diff) / m.seed_noise;
    out.push_back("Seeds, " + name_of(m.what) + ": mean B-A " + signed_number(m.mean_diff) +
                  " against a seed-to-seed noise of " + number(m.seed_noise) +
                  " per prompt (within-prompt sd A " + number(m.seed_sd_a) + ", B " +
                  number(m.seed_sd_b) + "): the difference is " +
                  (ratio >= 1 ? "larger than" : "within") + " the noise of sampling seeds.");
  }
}

}  // namespace

std::vector<std::string> headline_sentences(const Comparison& c) {
  std::vector<std::string> out;
  if (c.pairs.empty()) {
    out.push_back("No prompt of A pairs with a prompt of B: nothing was compared.");
    return out;
  }
  primary_sentences(c, out);
  design_sentence(c, out);
  lead_sentences(c, out);
  verdict_sentence(c, out);
  seed_sentences(c, out);
  return out;
}

}  // namespace clipwarden
