// compare.html: one self-contained page (inline CSS and SVG, no script, no
// network; a Content-Security-Policy that forbids both), every input string
// escaped. Links to the clips' reports are relative to the output folder.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>

#include "analyzer/core/assets.h"
#include "clipwarden/compare.h"
#include "report/html/compare_plot.h"
#include "report/html/html_escape.h"

namespace clipwarden {
namespace {

using html_detail::format_number;
namespace fs = std::filesystem;

constexpr size_t kWorstShown = 12;

std::string esc(std::string_view s) { return html_escape(s); }

std::string format_p(double p) {
  if (!std::isfinite(p)) return "\xE2\x80\x93";
  if (p < 1e-4) return "&lt; 0.0001";
  char buffer[32];
  std::snprintf(buffer, sizeof buffer, "%.4f", p);
  return buffer;
}

std::string signed_number(double v) {
  return (std::isfinite(v) && v > 0 ? "+" : "") + format_number(v);
}

// A path as seen from the output folder; absolute when no relative path exists.
std::string href_from(const std::string& out_dir, const std::string& target) {
  std::error_code ec;
  const fs::path base = fs::weakly_canonical(fs::absolute(out_dir, ec), ec);
  const fs::path file = fs::weakly_canonical(fs::absolute(target, ec), ec);
  fs::path rel = file.lexically_relative(base);
  if (rel.empty()) rel = file;
  return url_escape_path(rel.generic_string());
}

std::string clip_links(const std::vector<ClipEntry>& clips, const std::string& out_dir) {
  std::string out;
  for (const auto& c : clips) {
    if (!out.empty()) out += "<br>";
    out += "<a href=\"" + href_from(out_dir, c.page_path) + "\">" + esc(c.name) + "</a>";
  }
  return out;
}

std::string verdict_badge(const MetricComparison& m) {
  if (m.better == "b") return "<span class=\"badge better\">B better</span>";
  if (m.better == "a") return "<span class=\"badge worse\">B worse</span>";
  return "<span class=\"badge neither\">no clear difference</span>";
}

std::string head(const Comparison& c) {
  return "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
         "<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; "
         "style-src 'unsafe-inline'; img-src data:; base-uri 'none'; form-action 'none'\">"
         "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">"
         "<meta name=\"referrer\" content=\"no-referrer\">"
         "<title>clipwarden compare: " +
         esc(c.a_dir) + " vs " + esc(c.b_dir) + "</title><style>" +
         std::string(asset("compare.css")) + "</style></head><body>\n";
}

std::string overview(const Comparison& c) {
  int better = 0, worse = 0;
  for (const auto& m : c.metrics) better += m.better == "b", worse += m.better == "a";
  std::string s = "<header><h1>Model comparison</h1><dl class=\"inputs\"><dt>A</dt><dd>" +
                  esc(c.a_dir) + " <span class=\"muted\">(" + std::to_string(c.a_clip_count) +
                  " clips)</span></dd><dt>B</dt><dd>" + esc(c.b_dir) + " <span class=\"muted\">(" +
                  std::to_string(c.b_clip_count) + " clips)</span></dd></dl>";
  s += "<p class=\"lede\">" + std::to_string(c.pairs.size()) + " keys paired by <b>" +
       esc(to_string(c.pair_by)) + "</b>. Of " + std::to_string(c.metrics.size()) +
       " compared statistics, B is significantly better on <b>" + std::to_string(better) +
       "</b> and significantly worse on <b>" + std::to_string(worse) +
       "</b> (Wilcoxon signed-rank, Holm-adjusted across all statistics at " +
       format_number(c.options.alpha) + ").</p>";
  if (c.averaged)
    s += "<p class=\"note\">Several clips share a key on one side (e.g. seeds of a prompt); "
         "their values were averaged per key before pairing, so each key counts once.</p>";
  if (!c.unpaired.empty() || !c.failed.empty())
    s += "<p class=\"note\">" + std::to_string(c.unpaired.size()) + " unpaired key(s) and " +
         std::to_string(c.failed.size()) +
         " input(s) that could not be used are listed at the end of this page.</p>";
  return s + "</header>\n";
}

std::string verdict_row(const MetricComparison& m) {
  const char* row = m.better == "a" ? "row-worse" : m.better == "b" ? "row-better" : "";
  return std::string("<tr class=\"") + row + "\"><th scope=\"row\"><span class=\"metric\">" +
         esc(m.what.metric) + "</span> " + esc(m.what.statistic) +
         "<br><span class=\"muted small\">" + esc(m.what.direction) +
         "</span></th><td class=\"num\">" + std::to_string(m.n) + "</td><td class=\"num\">" +
         signed_number(m.mean_diff) + "</td><td class=\"num\">" + format_number(m.ci_low) +
         " &hellip; " + format_number(m.ci_high) + "</td><td class=\"num\">" +
         signed_number(m.median_diff) + "</td><td class=\"num\">" + std::to_string(m.wins_a) +
         " / " + std::to_string(m.ties) + " / " + std::to_string(m.wins_b) +
         "</td><td class=\"num\">" + signed_number(m.effect_size) + "</td><td class=\"num\">" +
         format_p(m.p_value) + "<br><span class=\"muted small\">" + esc(m.test) +
         "</span></td><td class=\"num\">" + format_p(m.p_holm) + "</td><td>" + verdict_badge(m) +
         "</td></tr>";
}

std::string verdict_table(const Comparison& c) {
  const int percent = static_cast<int>(std::lround(c.options.confidence_level * 100));
  std::string s =
      "<section><h2>Verdict per statistic</h2><div class=\"scroll\"><table class=\"verdicts\">"
      "<thead><tr><th>Statistic</th><th class=\"num\">n</th><th class=\"num\">Mean B&minus;A</th>"
      "<th class=\"num\">" +
      std::to_string(percent) +
      "% CI (BCa)</th><th class=\"num\">Median "
      "B&minus;A</th><th class=\"num\" title=\"keys where A is better / equal / B is better\">"
      "A / tie / B</th><th class=\"num\">Effect r</th><th class=\"num\">p</th>"
      "<th class=\"num\">p (Holm)</th><th>Verdict</th></tr></thead><tbody>";
  for (const auto& m : c.metrics) s += verdict_row(m);
  return s + "</tbody></table></div></section>\n";
}

std::string dot_plots(const Comparison& c) {
  std::string s =
      "<section><h2>Each key, A beside B</h2><p class=\"muted\">One line per key from its A value "
      "to its B value; <span class=\"key-worse\">worse in B</span>, <span "
      "class=\"key-better\">better "
      "in B</span>, <span class=\"key-same\">unchanged</span>, judged in each statistic's own "
      "direction.</p><div class=\"plots\">";
  for (size_t i = 0; i < c.metrics.size(); ++i) {
    const auto& m = c.metrics[i];
    s += "<figure>" + html_detail::paired_dot_plot(c, i) + "<figcaption><b>" + esc(m.what.metric) +
         "</b> " + esc(m.what.statistic) + " " + verdict_badge(m) + "<br><span class=\"muted\">" +
         esc(m.what.direction) + "</span></figcaption></figure>";
  }
  return s + "</div></section>\n";
}

// For each key: the statistic that worsened most, measured in standard
// deviations of that statistic's differences across keys.
std::pair<std::string, double> largest_worsening(const Comparison& c, const PairedKey& p) {
  std::pair<std::string, double> worst{"", 0};
  for (size_t i = 0; i < c.metrics.size(); ++i) {
    const auto& m = c.metrics[i];
    double sum = 0, sum2 = 0;
    int n = 0;
    for (const auto& q : c.pairs)
      if (std::isfinite(q.a_values[i]) && std::isfinite(q.b_values[i])) {
        const double d = q.b_values[i] - q.a_values[i];
        sum += d, sum2 += d * d, ++n;
      }
    if (n < 2 || !std::isfinite(p.a_values[i]) || !std::isfinite(p.b_values[i])) continue;
    const double sd = std::sqrt(std::max(0.0, (sum2 - sum * sum / n) / (n - 1)));
    if (!(sd > 0)) continue;
    const double d = p.b_values[i] - p.a_values[i];
    const double worsening = (m.what.higher_is_better ? -d : d) / sd;
    if (worsening > worst.second) worst = {m.what.metric + " " + m.what.statistic, worsening};
  }
  return worst;
}

std::string worst_keys(const Comparison& c, const std::string& out_dir) {
  size_t coherence = c.metrics.size();
  for (size_t i = 0; i < c.metrics.size(); ++i)
    if (c.metrics[i].what.key() == "coherence.score") coherence = i;
  std::vector<std::pair<double, const PairedKey*>> ranked;  // how much worse, bigger first
  for (const auto& p : c.pairs) {
    const double drop = coherence < c.metrics.size() ? p.a_values[coherence] - p.b_values[coherence]
                                                     : largest_worsening(c, p).second;
    if (std::isfinite(drop) && drop > 0) ranked.push_back({drop, &p});
  }
  std::stable_sort(ranked.begin(), ranked.end(),
                   [](auto& x, auto& y) { return x.first > y.first; });
  std::string s = "<section><h2>Keys that got most worse</h2>";
  if (ranked.empty()) return s + "<p class=\"muted\">No key lost coherence in B.</p></section>\n";
  s +=
      "<p class=\"muted\">Ranked by the drop in coherence score from A to B; the last column names "
      "the statistic that worsened most for that key, in standard deviations of its differences "
      "across keys.</p><div class=\"scroll\"><table><thead><tr><th>" +
      esc(to_string(c.pair_by)) +
      "</th><th class=\"num\">"
      "Coherence A</th><th class=\"num\">Coherence B</th><th class=\"num\">Change</th>"
      "<th>Report A</th><th>Report B</th><th>Largest worsening</th></tr></thead><tbody>";
  for (size_t i = 0; i < ranked.size() && i < kWorstShown; ++i) {
    const PairedKey& p = *ranked[i].second;
    const auto worst = largest_worsening(c, p);
    const bool has_coherence = coherence < c.metrics.size();
    s += "<tr><th scope=\"row\">" + esc(p.key) + "</th><td class=\"num\">" +
         (has_coherence ? format_number(p.a_values[coherence]) : "") + "</td><td class=\"num\">" +
         (has_coherence ? format_number(p.b_values[coherence]) : "") + "</td><td class=\"num\">" +
         (has_coherence ? signed_number(p.b_values[coherence] - p.a_values[coherence]) : "") +
         "</td><td>" + clip_links(p.a, out_dir) + "</td><td>" + clip_links(p.b, out_dir) +
         "</td><td>" +
         (worst.first.empty() ? ""
                              : esc(worst.first) + " <span class=\"muted\">+" +
                                    format_number(worst.second) + " sd</span>") +
         "</td></tr>";
  }
  return s + "</tbody></table></div></section>\n";
}

std::string leftovers(const Comparison& c, const std::string& out_dir) {
  if (c.unpaired.empty() && c.failed.empty()) return "";
  std::string s = "<section><h2>Not compared</h2>";
  if (!c.unpaired.empty()) {
    s += "<h3>Unpaired</h3><ul class=\"plain\">";
    for (const auto& u : c.unpaired)
      s += "<li><b>" + esc(u.side == "a" ? "A" : "B") + "</b> " +
           (u.key.empty() ? "" : "<code>" + esc(u.key) + "</code> ") +
           clip_links(u.clips, out_dir) + " <span class=\"muted\">" + esc(u.reason) +
           "</span></li>";
    s += "</ul>";
  }
  if (!c.failed.empty()) {
    s += "<h3>Could not be used</h3><ul class=\"plain\">";
    for (const auto& f : c.failed)
      s += "<li><b>" + esc(f.side == "a" ? "A" : "B") + "</b> <code>" + esc(f.path) +
           "</code> <span class=\"muted\">" + esc(f.error) + "</span></li>";
    s += "</ul>";
  }
  return s + "</section>\n";
}

std::string method_note(const Comparison& c) {
  const auto& o = c.options;
  return "<footer><h2>How to read this</h2><p>Each statistic is compared on the paired differences "
         "B&nbsp;&minus;&nbsp;A, one per key. The p-value is the two-sided Wilcoxon signed-rank "
         "test (exact null distribution up to 50 untied differences, otherwise the normal "
         "approximation with tie correction); zero differences: <b>" +
         esc(to_string(o.zero_rule)) +
         "</b> rule. p (Holm) adjusts for testing all statistics at once; a verdict needs "
         "p (Holm) &lt; " +
         format_number(o.alpha) +
         ". The interval is a BCa bootstrap interval of "
         "the mean difference (" +
         std::to_string(o.bootstrap_resamples) + " resamples, seed " +
         std::to_string(o.bootstrap_seed) +
         "). Effect r is the matched-pairs rank-biserial "
         "correlation: +1 when every non-zero difference has B above A, &minus;1 when below. "
         "Segment counts and per-frame statistics come from each clip's report; the coherence "
         "score is the report's 0&ndash;100 score.</p><p class=\"muted\">clipwarden compare</p>"
         "</footer>";
}

}  // namespace

std::string comparison_to_html(const Comparison& c, const std::string& out_dir) {
  return head(c) + "<main>" + overview(c) + verdict_table(c) + worst_keys(c, out_dir) +
         dot_plots(c) + leftovers(c, out_dir) + method_note(c) + "</main></body></html>\n";
}

}  // namespace clipwarden
