// compare.html: one self-contained page (inline CSS and SVG, no script, no
// network; a Content-Security-Policy that forbids both), every input string
// escaped. Links to the clips' reports are relative to the output folder.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>

#include "analyzer/core/assets.h"
#include "clipwarden/compare.h"
#include "analyzer/compare/compare_plot.h"
#include "report/html/html_escape.h"

namespace clipwarden {
namespace {

using html_detail::format_number;
namespace fs = std::filesystem;

constexpr size_t kWorstShown = 8;
constexpr size_t kCharts = 8;

std::string esc(std::string_view s) { return html_escape(s); }

std::string format_p(double p) {
  if (!std::isfinite(p)) return "\xE2\x80\x93";
  if (p < 1e-4) return "&lt; 0.0001";
  char buffer[32];
  std::snprintf(buffer, sizeof buffer, "%.4f", p);
  return buffer;
}

std::string signed_cell_number(double v) {
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

// An exploratory statistic's unadjusted reading, drawn so it cannot be
// mistaken for a verdict.
std::string lead_badge(const MetricComparison& m) {
  if (m.unadjusted_better == "b") return "<span class=\"badge lead-better\">B better?</span>";
  if (m.unadjusted_better == "a") return "<span class=\"badge lead-worse\">B worse?</span>";
  return "<span class=\"badge neither\">&ndash;</span>";
}

// A primary statistic without a verdict says whether the prompts at hand
// could have given one at all.
std::string badge(const Comparison& c, const MetricComparison& m) {
  if (!m.primary) return lead_badge(m);
  if (m.better == "neither" && !c.design.primary_can_reach)
    return "<span class=\"badge neither\" title=\"the smallest Holm-adjusted p these prompts "
           "allow is not below the level\">too few prompts to tell</span>";
  return verdict_badge(m);
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
  std::string s = "<header><h1>Model comparison</h1><dl class=\"inputs\"><dt>A</dt><dd>" +
                  esc(c.a_dir) + " <span class=\"muted\">(" + std::to_string(c.a_clip_count) +
                  " clips)</span></dd><dt>B</dt><dd>" + esc(c.b_dir) + " <span class=\"muted\">(" +
                  std::to_string(c.b_clip_count) + " clips)</span></dd></dl>";
  s += "<p class=\"muted\">" + std::to_string(c.pairs.size()) + " prompts paired by <b>" +
       esc(to_string(c.pair_by)) + "</b>.</p><ul class=\"headline\">";
  for (size_t i = 0; i < c.headline.size(); ++i)
    s += std::string(i == 0 ? "<li class=\"lead\">" : "<li>") + esc(c.headline[i]) + "</li>";
  s += "</ul>";
  if (!c.unpaired.empty() || !c.failed.empty())
    s += "<p class=\"note\">" + std::to_string(c.unpaired.size()) + " unpaired key(s) and " +
         std::to_string(c.failed.size()) +
         " input(s) that could not be used are listed at the end of this page.</p>";
  return s + "</header>\n";
}

std::string share_interval(const MetricComparison& m) {
  if (!std::isfinite(m.b_better_share)) return "\xE2\x80\x93";
  auto pct = [](double v) { return std::to_string(static_cast<int>(std::lround(100 * v))) + "%"; };
  return pct(m.b_better_share) + "<br><span class=\"muted small\">" + pct(m.b_better_low) +
         " &hellip; " + pct(m.b_better_high) + "</span>";
}

std::string verdict_row(const Comparison& c, const MetricComparison& m) {
  const std::string& side = m.primary ? m.better : m.unadjusted_better;
  const char* row = !m.primary ? "" : side == "a" ? "row-worse" : side == "b" ? "row-better" : "";
  return std::string("<tr class=\"") + row + "\"><th scope=\"row\"><span class=\"metric\">" +
         esc(m.what.metric) + "</span> " + esc(m.what.statistic) +
         "<br><span class=\"muted small\">" + esc(m.what.direction) +
         "</span></th><td class=\"num\">" + std::to_string(m.n) + "</td><td class=\"num\">" +
         signed_cell_number(m.mean_diff) + "<br><span class=\"muted small\">" + format_number(m.ci_low) +
         " &hellip; " + format_number(m.ci_high) + "</span></td><td class=\"num\">" +
         format_number(m.seed_noise) + "</td><td class=\"num\">" + std::to_string(m.wins_a) +
         " / " + std::to_string(m.ties) + " / " + std::to_string(m.wins_b) +
         "</td><td class=\"num\">" + share_interval(m) + "</td><td class=\"num\">" +
         format_p(m.sign_p_value) + "</td><td class=\"num\">" + signed_cell_number(m.effect_size) +
         "</td><td class=\"num\">" + format_p(m.p_value) + "<br><span class=\"muted small\">" +
         esc(m.test) + "</span></td><td class=\"num\">" +
         (m.primary ? format_p(m.p_holm) : "<span class=\"muted\">not adjusted</span>") +
         "</td><td>" + badge(c, m) + "</td></tr>";
}

std::string statistics_table(const Comparison& c, bool primary) {
  const int percent = static_cast<int>(std::lround(c.options.confidence_level * 100));
  std::string s =
      primary ? "<section><h2>Primary family: the verdict</h2><p class=\"muted\">These decide the "
                "headline. Holm's adjustment runs over these statistics only.</p>"
              : "<section><h2>Exploratory statistics</h2><p class=\"muted\">Shown with their "
                "effect size, interval and <b>unadjusted</b> p: leads to follow, not verdicts. "
                "With many statistics some will have a small p by chance.</p>";
  s += "<div class=\"scroll\"><table class=\"verdicts\"><thead><tr><th>Statistic</th>"
       "<th class=\"num\">n</th><th class=\"num\">Mean B&minus;A<br>" +
       std::to_string(percent) +
       "% CI (BCa)</th><th class=\"num\" title=\"standard deviation of one prompt's difference "
       "from resampling seeds alone\">Seed noise</th><th class=\"num\" title=\"prompts where A "
       "is better / equal / B is better\">A / tie / B</th><th class=\"num\">B better share<br>" +
       std::to_string(percent) +
       "% CI (exact)</th><th class=\"num\">Sign test p</th><th class=\"num\">Effect r</th>"
       "<th class=\"num\">Wilcoxon p</th><th class=\"num\">p (Holm)</th><th>" +
       (primary ? "Verdict" : "Lead") + "</th></tr></thead><tbody>";
  int rows = 0;
  for (const auto& m : c.metrics)
    if (m.primary == primary) s += verdict_row(c, m), ++rows;
  if (rows == 0) return "";
  return s + "</tbody></table></div></section>\n";
}

// The statistics worth a per-prompt chart: the primary ones that were
// tested, then the exploratory leads by p, at most kCharts.
std::vector<size_t> charted(const Comparison& c) {
  std::vector<size_t> primary, leads;
  for (size_t i = 0; i < c.metrics.size(); ++i) {
    const auto& m = c.metrics[i];
    if (m.primary && m.test != "none") primary.push_back(i);
    if (!m.primary && m.unadjusted_better != "neither") leads.push_back(i);
  }
  std::stable_sort(leads.begin(), leads.end(),
                   [&](size_t x, size_t y) { return c.metrics[x].p_value < c.metrics[y].p_value; });
  primary.insert(primary.end(), leads.begin(), leads.end());
  if (primary.size() > kCharts) primary.resize(kCharts);
  return primary;
}

std::string worst_prompts_table(const Comparison& c, size_t column, const std::string& out_dir) {
  const auto changes = html_detail::prompt_changes(c, column);
  std::string rows;
  for (size_t i = 0; i < changes.size() && i < kWorstShown && changes[i].worse > 0; ++i) {
    const auto& ch = changes[i];
    rows += "<tr><th scope=\"row\">" + esc(ch.pair->key) + "</th><td class=\"num\">" +
            format_number(ch.a) + "</td><td class=\"num\">" + format_number(ch.b) +
            "</td><td class=\"num\">" + signed_cell_number(ch.b - ch.a) + "</td><td>" +
            clip_links(ch.pair->a, out_dir) + "</td><td>" + clip_links(ch.pair->b, out_dir) +
            "</td></tr>";
  }
  if (rows.empty()) return "<p class=\"muted\">No prompt got worse in B on this statistic.</p>";
  return "<div class=\"scroll\"><table class=\"worst\"><thead><tr><th>" +
         esc(to_string(c.pair_by)) +
         "</th><th class=\"num\">A</th><th class=\"num\">B</th><th class=\"num\">B&minus;A</th>"
         "<th>Clips of A</th><th>Clips of B</th></tr></thead><tbody>" +
         rows + "</tbody></table></div>";
}

std::string per_prompt_charts(const Comparison& c, const std::string& out_dir) {
  const auto columns = charted(c);
  if (columns.empty()) return "";
  std::string s =
      "<section><h2>Prompt by prompt</h2><p class=\"muted\">Each bar is one prompt's difference "
      "B&nbsp;&minus;&nbsp;A, worst in B on the left; <span class=\"key-worse\">worse in "
      "B</span>, <span class=\"key-better\">better in B</span>. The grey band is the "
      "seed-to-seed noise of one prompt's difference when prompts have several clips. The "
      "table under each chart links both sides' clips of the prompts that got most worse.</p>";
  for (size_t column : columns) {
    const auto& m = c.metrics[column];
    s += "<figure class=\"wide\"><figcaption><b>" + esc(m.what.metric) + "</b> " +
         esc(m.what.statistic) + " " + badge(c, m) + " <span class=\"muted\">" +
         esc(m.what.direction) + "</span></figcaption>" +
         html_detail::prompt_difference_chart(c, column) + worst_prompts_table(c, column, out_dir) +
         "</figure>";
  }
  return s + "</section>\n";
}

std::string verdict_comparison(const Comparison& c) {
  const auto& v = c.verdicts;
  const int prompts = v.both_pass + v.only_a_pass + v.only_b_pass + v.neither_pass;
  if (prompts == 0) return "";
  auto cell = [](int n) { return "<td class=\"num\">" + std::to_string(n) + "</td>"; };
  auto counts = [&](const char* side, const std::array<int, 3>& k) {
    return std::string("<tr><th scope=\"row\">") + side + "</th>" + cell(k[0]) + cell(k[1]) +
           cell(k[2]) + "</tr>";
  };
  return "<section><h2>Verdicts</h2><div class=\"twin\"><div><h3>Prompts passing</h3>"
         "<table class=\"mcnemar\"><thead><tr><th></th><th class=\"num\">B passes</th>"
         "<th class=\"num\">B does not</th></tr></thead><tbody><tr><th scope=\"row\">A "
         "passes</th>" +
         cell(v.both_pass) + cell(v.only_a_pass) + "</tr><tr><th scope=\"row\">A does not</th>" +
         cell(v.only_b_pass) + cell(v.neither_pass) +
         "</tr></tbody></table><p class=\"muted small\">A prompt passes when more than half of "
         "its clips pass. McNemar's exact test on the " +
         std::to_string(v.only_a_pass + v.only_b_pass) +
         " prompts that changed: p = " + format_p(v.p_value) +
         " (not part of the Holm family; the pass share above is).</p></div><div><h3>Clips "
         "at each verdict</h3><table><thead><tr><th></th><th class=\"num\">pass</th><th "
         "class=\"num\">review</th><th class=\"num\">reject</th></tr></thead><tbody>" +
         counts("A", v.clips_a) + counts("B", v.clips_b) +
         "</tbody></table></div></div></section>\n";
}

std::string dot_plots(const Comparison& c) {
  std::string s =
      "<section><details><summary><h2>Every statistic, A beside B</h2></summary><p "
      "class=\"muted\">One line per prompt from its A value to its B value; <span "
      "class=\"key-worse\">worse in B</span>, <span class=\"key-better\">better in B</span>, "
      "<span class=\"key-same\">unchanged</span>, judged in each statistic's own "
      "direction.</p><div class=\"plots\">";
  for (size_t i = 0; i < c.metrics.size(); ++i) {
    const auto& m = c.metrics[i];
    s += "<figure>" + html_detail::paired_dot_plot(c, i) + "<figcaption><b>" + esc(m.what.metric) +
         "</b> " + esc(m.what.statistic) + " " + badge(c, m) + "<br><span class=\"muted\">" +
         esc(m.what.direction) + "</span></figcaption></figure>";
  }
  return s + "</div></details></section>\n";
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
         "test (exact null distribution up to 50 differences, given their ties; otherwise the "
         "normal approximation with tie correction); zero differences: <b>" +
         esc(to_string(o.zero_rule)) +
         "</b> rule. p (Holm) adjusts for testing the primary family at once; a verdict needs "
         "p (Holm) &lt; " +
         format_number(o.alpha) +
         ". Exploratory statistics are not adjusted and get no verdict. The sign test counts "
         "the prompts where B is better against those where it is worse (ties left out); its "
         "interval is the exact Clopper&ndash;Pearson interval of that share. Several clips of "
         "a prompt (seeds) are averaged first: prompts are the independent unit" +
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
  return head(c) + "<main>" + overview(c) + per_prompt_charts(c, out_dir) +
         statistics_table(c, true) + verdict_comparison(c) + statistics_table(c, false) +
         dot_plots(c) + leftovers(c, out_dir) + method_note(c) + "</main></body></html>\n";
}

}  // namespace clipwarden
