#include "analyzer/gate/queue_page.h"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "analyzer/core/assets.h"
#include "clipwarden/version.h"
#include "report/html/csp.h"
#include "report/html/html_escape.h"

namespace clipwarden {
namespace {

int rank(const ClipResult& r) {
  if (!r.verdict) return 2;
  switch (*r.verdict) {
    case Verdict::reject:
      return 0;
    case Verdict::review:
      return 1;
    case Verdict::pass:
      return 3;
  }
  return 3;
}

std::string coherence_text(double c) {
  if (!is_defined(c)) return "&ndash;";
  char buf[16];
  std::snprintf(buf, sizeof buf, "%.1f", c);
  return buf;
}

std::string counts_line(const GateCounts& c) {
  auto pill = [](const char* cls, int n, const char* label) {
    return std::string("<span class=\"pill ") + cls + "\">" + std::to_string(n) + " " + label +
           "</span>";
  };
  return pill("total", c.total, "clips") + pill("reject", c.reject, "reject") +
         pill("review", c.review, "review") + pill("error", c.error, "error") +
         pill("pass", c.pass, "pass") + pill("store", c.from_store, "from store");
}

std::string clip_cell(const ClipResult& r) {
  std::string out = "<div class=\"clip-id\">" + html_escape(r.input.id) + "</div>";
  if (r.input.path != r.input.id)
    out += "<div class=\"clip-path\">" + html_escape(r.input.path) + "</div>";
  std::string tags;
  if (!r.input.model.empty())
    tags += "<span class=\"tag\">model " + html_escape(r.input.model) + "</span>";
  if (!r.input.prompt_id.empty())
    tags += "<span class=\"tag\">prompt " + html_escape(r.input.prompt_id) + "</span>";
  if (!r.input.seed.is_null())
    tags += "<span class=\"tag\">seed " + html_escape(r.input.seed.dump()) + "</span>";
  if (r.from_store) tags += "<span class=\"tag store\">from store</span>";
  if (!tags.empty()) out += "<div class=\"tags\">" + tags + "</div>";
  return out;
}

std::string reasons_cell(const ClipResult& r) {
  if (r.error) return "<div class=\"error-text\">" + html_escape(r.error->message()) + "</div>";
  if (r.reasons.empty()) return "<span class=\"quiet\">no rule fired</span>";
  std::string out = "<ul>";
  for (const auto& reason : r.reasons) out += "<li>" + html_escape(reason) + "</li>";
  return out + "</ul>";
}

std::string row(const ClipResult& r, const std::string& link) {
  const std::string status = queue_status(r);
  std::string report = link.empty() ? std::string("<span class=\"quiet\">none</span>")
                                    : "<a href=\"" + url_escape_path(link) + "\">report</a>";
  return "<tr class=\"" + status + "\"><td><span class=\"verdict " + status + "\">" + status +
         "</span></td><td class=\"num\">" + coherence_text(r.coherence) + "</td><td>" +
         clip_cell(r) + "</td><td>" + reasons_cell(r) + "</td><td>" + report + "</td></tr>\n";
}

}  // namespace

std::vector<size_t> worst_first_order(const std::vector<ClipResult>& results) {
  std::vector<size_t> order(results.size());
  for (size_t i = 0; i < order.size(); ++i) order[i] = i;
  std::stable_sort(order.begin(), order.end(), [&](size_t a, size_t b) {
    const auto& x = results[a];
    const auto& y = results[b];
    if (rank(x) != rank(y)) return rank(x) < rank(y);
    const double cx = is_defined(x.coherence) ? x.coherence : INFINITY;
    const double cy = is_defined(y.coherence) ? y.coherence : INFINITY;
    if (cx != cy) return cx < cy;
    return x.input.index < y.input.index;
  });
  return order;
}

std::string render_queue_page(const std::vector<ClipResult>& results,
                              const std::vector<std::string>& links) {
  GateCounts counts;
  for (const auto& r : results) counts.add(r);
  std::string rows;
  for (size_t i : worst_first_order(results))
    rows += row(results[i], i < links.size() ? links[i] : "");
  // The style is allowed by its hash (CSP Level 2), like the clip pages; the
  // page has no script at all.
  const std::string style(asset("queue.css"));
  std::string page =
      "<!doctype html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
      "<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; img-src data:; "
      "style-src " +
      csp_hash_source(style) +
      "; base-uri 'none'; form-action 'none'\">\n"
      "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
      "<title>clipwarden review queue (" +
      std::to_string(counts.total) + " clips)</title>\n<style>";
  page += style;
  page +=
      "</style>\n</head>\n<body>\n<header>\n<h1>Review queue</h1>\n<p class=\"counts\">" +
      counts_line(counts) +
      "</p>\n<p class=\"quiet\">Worst first: reject, review, error, pass; then lowest coherence. "
      "Written by clipwarden " +
      html_escape(version()) + ".</p>\n</header>\n<main>\n";
  if (results.empty()) {
    page += "<p class=\"quiet\">No clips in this queue.</p>\n";
  } else {
    page +=
        "<table>\n<thead><tr><th>Verdict</th><th>Coherence</th><th>Clip</th><th>Reasons</th>"
        "<th>Report</th></tr></thead>\n<tbody>\n" +
        rows + "</tbody>\n</table>\n";
  }
  page += "</main>\n</body>\n</html>\n";
  return page;
}

}  // namespace clipwarden
