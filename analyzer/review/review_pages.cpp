#include "analyzer/review/review_pages.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <set>

#include "analyzer/core/assets.h"
#include "analyzer/metrics/metric_descriptor.h"
#include "report/html/csp.h"
#include "report/html/html_escape.h"

namespace clipwarden::review {
namespace {

std::string policy_for(std::string_view style, std::string_view script) {
  return "default-src 'none'; img-src 'self' data:; media-src 'self'; connect-src 'self'; style-src " +
         csp_hash_source(style) + "; script-src " + csp_hash_source(script) +
         "; base-uri 'none'; form-action 'none'; frame-ancestors 'none'";
}

// JSON placed inside a <script type="application/json"> block: "<" written
// as \u003c so no input can close the block.
std::string json_in_page(const nlohmann::json& j) {
  const std::string text = j.dump(-1, ' ', false, nlohmann::json::error_handler_t::replace);
  std::string out;
  for (char c : text) {
    if (c == '<')
      out += "\\u003c";
    else
      out.push_back(c);
  }
  return out;
}

std::string with_token(const std::string& path, const std::string& token) {
  return path + "?token=" + token;
}

std::string number_text(double v, const char* format) {
  if (!is_defined(v)) return "&ndash;";
  char buf[32];
  std::snprintf(buf, sizeof buf, format, v);
  return buf;
}

std::string page_head(const std::string& title, const std::string& style, const std::string& token) {
  return "<!doctype html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
         "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
         "<meta name=\"referrer\" content=\"no-referrer\">\n"
         // No icon: a browser would ask for /favicon.ico without the token.
         "<link rel=\"icon\" href=\"data:,\">\n"
         "<meta name=\"clipwarden-token\" content=\"" +
         html_escape(token) + "\">\n<title>" + html_escape(title) + "</title>\n<style>" + style +
         "</style>\n</head>\n";
}

std::string decision_label(const std::string& d) { return d == "second_look" ? "second look" : d; }

std::string tags_of(const ClipResult& r) {
  std::string tags;
  if (!r.input.model.empty()) tags += "<span class=\"tag\">model " + html_escape(r.input.model) + "</span>";
  if (!r.input.prompt_id.empty())
    tags += "<span class=\"tag\">prompt " + html_escape(r.input.prompt_id) + "</span>";
  if (!r.input.seed.is_null()) tags += "<span class=\"tag\">seed " + html_escape(r.input.seed.dump()) + "</span>";
  return tags;
}

std::string reasons_block(const ReviewClip& c) {
  const ClipResult& r = c.result;
  if (r.error) return "<p class=\"error-text\">" + html_escape(r.error->message()) + "</p>";
  if (r.reasons.empty()) return "<p class=\"quiet\">no rule fired</p>";
  std::string out = "<p class=\"headline\">" + html_escape(c.headline) + "</p>";
  out += "<details><summary>" + std::to_string(r.reasons.size()) +
         (r.reasons.size() == 1 ? " reason" : " reasons") + " as the gate wrote them</summary><ul>";
  for (const auto& reason : r.reasons) out += "<li>" + html_escape(reason) + "</li>";
  return out + "</ul></details>";
}

std::string queue_row(const ReviewClip& c, const DecisionsByClip& decided, const std::string& token) {
  const ClipResult& r = c.result;
  const std::string status = queue_status(r);
  auto d = decided.find(r.input.id);
  const std::string decision = d == decided.end() ? "" : d->second.decision;
  std::string metrics;
  for (const auto& m : c.metrics) metrics += (metrics.empty() ? "" : " ") + m;
  const std::string link = with_token("/clip/" + c.key, token);
  std::string row = "<li class=\"row " + status + "\" data-key=\"" + c.key + "\" data-verdict=\"" + status +
                    "\" data-metrics=\"" + html_escape(metrics) + "\" data-model=\"" +
                    html_escape(r.input.model) + "\" data-prompt=\"" + html_escape(r.input.prompt_id) +
                    "\" data-decision=\"" + decision + "\">\n";
  row += "<a class=\"strip\" href=\"" + link + "\" tabindex=\"-1\">";
  row += c.video_path.empty() ? "<span class=\"quiet\">clip not found</span>"
                              : "<img loading=\"lazy\" alt=\"frames of the clip\" src=\"" +
                                    with_token("/clip/" + c.key + "/strip.jpg", token) + "\">";
  row += "</a>\n<div class=\"body\"><div class=\"line\"><span class=\"verdict " + status + "\">" + status +
         "</span><span class=\"coherence\" title=\"coherence 0-100\">" + number_text(r.coherence, "%.1f") +
         "</span><a class=\"clip-id\" href=\"" + link + "\">" + html_escape(r.input.id) + "</a>" + tags_of(r) +
         "<span class=\"decision\">" + (decision.empty() ? "" : html_escape(decision_label(decision))) +
         "</span></div>\n" + reasons_block(c) + "</div>\n</li>\n";
  return row;
}

std::string options_of(const std::set<std::string>& values, const char* all) {
  std::string out = std::string("<option value=\"\">") + all + "</option>";
  for (const auto& v : values)
    if (!v.empty()) out += "<option value=\"" + html_escape(v) + "\">" + html_escape(v) + "</option>";
  return out;
}

}  // namespace

Page render_queue_page(const ReviewFolder& folder, const DecisionsByClip& decided, const std::string& token) {
  std::set<std::string> metrics, models, prompts;
  int left = 0;
  std::string rows;
  for (const auto& c : folder.clips) {
    metrics.insert(c.metrics.begin(), c.metrics.end());
    models.insert(c.result.input.model);
    prompts.insert(c.result.input.prompt_id);
    if (!decided.count(c.result.input.id)) ++left;
    rows += queue_row(c, decided, token);
  }
  const std::string style(asset("review.css"));
  const std::string script(asset("review_queue.js"));
  std::string html = page_head("Review queue", style, token);
  html += "<body class=\"queue\">\n<header>\n<h1>Review queue</h1>\n<p class=\"counts\"><span id=\"left\">" +
          std::to_string(left) + "</span> of " + std::to_string(folder.clips.size()) +
          " clips left to decide; <span id=\"shown\">" + std::to_string(folder.clips.size()) +
          "</span> shown</p>\n<form id=\"filters\" class=\"filters\">\n"
          "<label>verdict <select id=\"f-verdict\"><option value=\"\">any</option><option>reject</option>"
          "<option>review</option><option>error</option><option>pass</option></select></label>\n"
          "<label>metric <select id=\"f-metric\">" +
          options_of(metrics, "any") + "</select></label>\n<label>model <select id=\"f-model\">" +
          options_of(models, "any") + "</select></label>\n<label>prompt <select id=\"f-prompt\">" +
          options_of(prompts, "any") +
          "</select></label>\n<label>decided <select id=\"f-decided\"><option value=\"\">any</option>"
          "<option value=\"no\">undecided</option><option value=\"yes\">decided</option></select></label>\n"
          "</form>\n<p class=\"quiet keys\">Worst first. Keys: <kbd>j</kbd> / <kbd>k</kbd> move, "
          "<kbd>Enter</kbd> opens, <kbd>u</kbd> opens the first undecided clip. <a href=\"" +
          with_token("/agreement", token) + "\">Agreement with people&#39;s decisions</a></p>\n</header>\n<main>\n";
  if (folder.clips.empty()) html += "<p class=\"quiet\">No clips in this queue.</p>\n";
  html += "<ol id=\"rows\" class=\"rows\">\n" + rows + "</ol>\n</main>\n<script>" + script + "</script>\n</body>\n</html>\n";
  return {html, policy_for(style, script)};
}

Page render_agreement_page(const ReviewFolder& folder, const std::vector<RuleAgreement>& rules,
                           const std::string& token) {
  std::map<std::string, std::string> key_of;
  for (const auto& c : folder.clips) key_of[c.result.input.id] = c.key;
  static const char* verdicts[3] = {"pass", "review", "reject"};
  static const char* decisions[3] = {"keep", "second look", "reject"};
  int clips = 0, agree = 0;
  std::string body;
  for (const auto& r : rules) {
    clips += r.clips;
    agree += r.agree;
    body += "<section class=\"rule\"><h2>" + html_escape(r.rule) + "</h2><p>" + std::to_string(r.agree) + " of " +
            std::to_string(r.clips) + " agree</p>\n<table><thead><tr><th>gate \\ people</th>";
    for (const char* d : decisions) body += std::string("<th>") + d + "</th>";
    body += "</tr></thead><tbody>";
    for (int t = 0; t < 3; ++t) {
      body += std::string("<tr><th>") + verdicts[t] + "</th>";
      for (int p = 0; p < 3; ++p)
        body += std::string("<td class=\"num") + (t == p ? " agree" : "") + "\">" + std::to_string(r.counts[t][p]) +
                "</td>";
      body += "</tr>";
    }
    body += "</tbody></table>\n";
    if (!r.differ.empty()) {
      body += "<p>Where they differ:</p><ul class=\"differ\">";
      for (const auto& id : r.differ) {
        auto k = key_of.find(id);
        body += "<li>" + (k == key_of.end() ? html_escape(id)
                                            : "<a href=\"" + with_token("/clip/" + k->second, token) + "\">" +
                                                  html_escape(id) + "</a>") +
                "</li>";
      }
      body += "</ul>\n";
    }
    body += "</section>\n";
  }
  const std::string style(asset("review.css"));
  const std::string script;  // no script on this page
  std::string html = page_head("Agreement with people's decisions", style, token);
  html += "<body class=\"agreement\">\n<header>\n<p><a href=\"" + with_token("/", token) +
          "\">&larr; queue</a></p>\n<h1>Agreement with people&#39;s decisions</h1>\n<p>" + std::to_string(agree) +
          " of " + std::to_string(clips) +
          " decided clips agree (keep = pass, second look = review, reject = reject), by the rule that decided "
          "each clip. <code>clipwarden calibrate DIR</code> proposes levels that match better.</p>\n</header>\n"
          "<main>\n" +
          (rules.empty() ? std::string("<p class=\"quiet\">No decisions yet.</p>\n") : body) +
          "</main>\n</body>\n</html>\n";
  return {html, policy_for(style, script)};
}

nlohmann::json timeline_data(const nlohmann::json& report, const std::vector<std::string>& metrics) {
  nlohmann::json out = {{"t", nlohmann::json::array()}, {"series", nlohmann::json::array()},
                        {"segments", nlohmann::json::array()}};
  if (!report.is_object()) return out;
  // The metrics of the clip's reasons and segments first, then the two the
  // coherence score leans on most, so every clip shows something.
  std::vector<std::string> shown = metrics;
  auto add = [&](const std::string& m) {
    if (find_column(m) && std::find(shown.begin(), shown.end(), m) == shown.end()) shown.push_back(m);
  };
  if (auto s = report.find("segments"); s != report.end() && s->is_array())
    for (const auto& seg : *s) {
      if (!seg.is_object()) continue;
      add(seg.value("metric", ""));
      out["segments"].push_back({{"metric", seg.value("metric", "")},
                                 {"start_s", seg.value("start_s", 0.0)},
                                 {"end_s", seg.value("end_s", 0.0)},
                                 {"start_frame", seg.value("start_frame", 0)},
                                 {"end_frame", seg.value("end_frame", 0)},
                                 {"peak", seg.value("peak", 0.0)},
                                 {"peak_frame", seg.value("peak_frame", 0)},
                                 {"severity", seg.value("severity", "info")}});
    }
  add("warp_error");
  add("flicker");
  auto frames = report.find("frames");
  if (frames == report.end() || !frames->is_array()) return out;
  for (const auto& m : shown) {
    nlohmann::json values = nlohmann::json::array();
    for (const auto& f : *frames) {
      auto v = f.is_object() ? f.find(m) : f.end();
      values.push_back(f.is_object() && v != f.end() && v->is_number() ? *v : nlohmann::json(nullptr));
    }
    const ColumnDescriptor* col = find_column(m);
    out["series"].push_back({{"metric", m}, {"unit", col ? col->unit : ""}, {"values", values}});
  }
  for (const auto& f : *frames) out["t"].push_back(f.is_object() ? f.value("t", 0.0) : 0.0);
  return out;
}

Page render_clip_page(const ReviewClip& c, const nlohmann::json& report, const DecisionsByClip& decided,
                      const std::string& next, const std::string& token) {
  const ClipResult& r = c.result;
  const std::string status = queue_status(r);
  auto d = decided.find(r.input.id);
  nlohmann::json data = timeline_data(report, c.metrics);
  data["key"] = c.key;
  data["next"] = next;
  data["decision"] = d == decided.end() ? nlohmann::json(nullptr) : decision_to_json(d->second);
  std::vector<std::string> tag_choices;
  for (const MetricDescriptor* m : metric_descriptors())
    for (const auto& col : m->columns)
      if (col.better == Better::lower) tag_choices.push_back(col.name);
  data["tag_choices"] = tag_choices;
  data["suggested_tags"] = c.metrics;

  const std::string style(asset("review.css"));
  const std::string script(asset("review_clip.js"));
  std::string html = page_head(r.input.id + " - review", style, token);
  html += "<body class=\"clip\">\n<header>\n<p><a href=\"" + with_token("/", token) +
          "\" id=\"to-queue\">&larr; queue</a></p>\n<h1><span class=\"verdict " + status + "\">" + status +
          "</span> " + html_escape(r.input.id) + "</h1>\n<p class=\"line\"><span class=\"coherence\">coherence " +
          number_text(r.coherence, "%.1f") + "</span>" + tags_of(r) + "</p>\n" + reasons_block(c) +
          "</header>\n<main>\n<section class=\"player\">\n";
  if (c.video_path.empty())
    html += "<p class=\"error-text\">The clip named by the queue was not found.</p>\n";
  else
    html += "<video id=\"video\" controls preload=\"auto\" src=\"" + with_token("/clip/" + c.key + "/video", token) +
            "\"></video>\n";
  html +=
      "<div id=\"timeline\" class=\"timeline\" tabindex=\"0\" aria-label=\"metrics over time; click to "
      "seek\"></div>\n<p id=\"readout\" class=\"readout quiet\"></p>\n<div id=\"marks\" class=\"marks\"></div>\n"
      "</section>\n<section class=\"decide\" aria-label=\"decision\">\n<h2>Decision</h2>\n"
      "<p class=\"quiet keys\"><kbd>k</kbd> keep, <kbd>r</kbd> reject, <kbd>s</kbd> needs a second look "
      "(the next undecided clip opens); <kbd>t</kbd> tags, <kbd>o</kbd> note, <kbd>Space</kbd> play/pause, "
      "<kbd>n</kbd> / <kbd>p</kbd> next / previous flagged segment, <kbd>q</kbd> queue.</p>\n"
      "<p id=\"current-decision\" class=\"current\"></p>\n<div class=\"buttons\">"
      "<button type=\"button\" data-decision=\"keep\">keep (k)</button>"
      "<button type=\"button\" data-decision=\"reject\">reject (r)</button>"
      "<button type=\"button\" data-decision=\"second_look\">second look (s)</button></div>\n"
      "<div id=\"tag-boxes\" class=\"tag-boxes\"></div>\n"
      "<label>more tags <input id=\"free-tags\" type=\"text\" placeholder=\"comma separated\"></label>\n"
      "<label>note <textarea id=\"note\" rows=\"2\"></textarea></label>\n"
      "<label>reviewer <input id=\"reviewer\" type=\"text\" autocomplete=\"name\"></label>\n"
      "<p id=\"status\" class=\"status\" role=\"status\"></p>\n</section>\n"
      "<section class=\"pictures\"><h2>Worst frames</h2><div id=\"panels\" class=\"panels\"></div>"
      "<p class=\"quiet\">Each picture: the frame, the previous frame warped onto it, the warp error heat map and "
      "the motion colours (docs/html.md explains them).";
  if (!c.report_html.empty())
    html += " <a href=\"" + with_token("/clip/" + c.key + "/report.html", token) + "\">The full report</a>.";
  html += "</p></section>\n</main>\n<script type=\"application/json\" id=\"clip-data\">" + json_in_page(data) +
          "</script>\n<script>" + script + "</script>\n</body>\n</html>\n";
  return {html, policy_for(style, script)};
}

}  // namespace clipwarden::review
