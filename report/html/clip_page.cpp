// The per-clip HTML page (include/clipwarden/html_report.h): one
// self-contained file. Layout: verdict and facts on top, the photosensitive
// caution when flashes were found, the timeline, the worst frames of the
// flagged segments as panel sets, then the tables.
#include <cmath>
#include <cstdio>
#include <filesystem>

#include "analyzer/core/assets.h"
#include "clipwarden/analysis.h"
#include "clipwarden/html_report.h"
#include "clipwarden/report_io.h"
#include "clipwarden/version.h"
#include "report/html/csp.h"
#include "report/html/html_escape.h"
#include "report/html/page_parts.h"

namespace clipwarden {
namespace {

using page::num;
using page::seconds;

// Flashes were found when the flash series (flashes in the one-second window
// ending at each frame) is ever above zero, or summary.flash.details counts
// any or reports a hazard (analyzer/metrics/flash_metric.cpp).
bool flashes_found(const Report& report) {
  if (const MetricSeries* s = report.find_series("flash"))
    for (double v : s->values)
      if (std::isfinite(v) && v > 0) return true;
  if (!report.summary.details.contains("flash")) return false;
  const auto& flash = report.summary.details["flash"];
  if (!flash.is_object()) return false;
  for (const char* key :
       {"max_flashes_per_s", "general_max_flashes_per_s", "red_max_flashes_per_s"})
    if (auto it = flash.find(key); it != flash.end() && it->is_number() && it->get<double>() > 0)
      return true;
  const auto hazard = flash.find("hazard");
  return hazard != flash.end() && hazard->is_boolean() && hazard->get<bool>();
}

std::string caution_block(const Report& report) {
  if (!flashes_found(report)) return "";
  return "<aside class=\"caution\" role=\"note\" aria-labelledby=\"h-caution\">\n<h2 "
         "id=\"h-caution\">"
         "Photosensitivity caution</h2>\n<p>This clip contains flashes (WCAG 2.x general or red "
         "flashes). "
         "Viewers with photosensitive epilepsy can be harmed by flashing images. This check is a "
         "screening aid, not a certification: broadcasters and platforms have their own rules, and "
         "those rules decide.</p>\n</aside>\n";
}

std::string fact(const std::string& name, const std::string& value_html) {
  return "<div><dt>" + html_escape(name) + "</dt><dd>" + value_html + "</dd></div>";
}

std::string facts_block(const Report& report, const HtmlOptions& options) {
  const ClipInfo& c = report.clip;
  const StreamFacts& st = report.summary.stream;
  std::string out =
      "<section class=\"card facts\" aria-labelledby=\"h-facts\">\n<h2 "
      "id=\"h-facts\">Clip</h2>\n<dl>";
  out += fact("file", "<span class=\"path\">" + html_escape(c.path) + "</span>");
  for (const auto& [name, value] : options.facts)
    out += fact(name, "<span class=\"given\">" + html_escape(value) + "</span>");
  out += fact("container / codec", html_escape(c.container) + " / " + html_escape(c.codec));
  out +=
      fact("picture", std::to_string(c.width) + "\u00d7" + std::to_string(c.height) + " px, " +
                          html_escape(c.pix_fmt) + ", " + std::to_string(c.bit_depth) + "-bit" +
                          (c.rotation ? ", rotated " + std::to_string(c.rotation) + "\u00b0" : ""));
  out += fact("frames", std::to_string(c.frame_count) + " at " + num(c.fps) + " fps, " +
                            seconds(c.duration_s));
  std::string stream = st.vfr ? "variable frame rate" : "constant frame rate";
  if (st.dropped_frames) stream += ", " + std::to_string(st.dropped_frames) + " dropped";
  if (st.decode_errors) stream += ", " + std::to_string(st.decode_errors) + " decode errors";
  if (st.concealed_frames) stream += ", " + std::to_string(st.concealed_frames) + " concealed";
  if (st.lost_frames) stream += ", " + std::to_string(st.lost_frames) + " lost in decoding";
  if (st.duplicate_timestamps)
    stream += ", " + std::to_string(st.duplicate_timestamps) + " repeated timestamps";
  if (report.summary.details.contains("cadence")) {
    const auto& cadence = report.summary.details["cadence"];
    stream += ", " + std::to_string(cadence.value("stored_frames", 0)) + " stored frames hold " +
              std::to_string(cadence.value("pictures", 0)) + " pictures (content " +
              num(cadence.value("content_fps", 0.0)) +
              " fps): repeats of that cadence were left out of the analysis";
  }
  out += fact("timing", stream);
  std::string audio = c.audio.present ? html_escape(c.audio.codec) : "none";
  if (c.audio.duration_s) audio += ", " + seconds(*c.audio.duration_s);
  if (st.mismatch_s && *st.mismatch_s > 0)
    audio += ", differs from video by " + seconds(*st.mismatch_s);
  if (c.audio.silent_from_s) audio += ", silent from " + seconds(*c.audio.silent_from_s);
  out += fact("audio", audio);
  std::string settings;
  if (report.settings.is_object())
    for (const auto& [k, v] : report.settings.items()) {
      if (v.is_null()) continue;
      settings += (settings.empty() ? "" : " \u00b7 ") + html_escape(k) + " " +
                  html_escape(v.is_string() ? v.get<std::string>() : v.dump());
    }
  out += fact("analysis settings", settings.empty() ? "\u2014" : settings);
  if (!c.sha256.empty())
    out += fact("sha256", "<code class=\"hash\">" + html_escape(c.sha256) + "</code>");
  return out + "</dl>\n</section>\n";
}

std::string verdict_block(const Report& report, page::CssRules& css) {
  const std::string status = to_string(report.verdict.status);
  const double score = std::clamp(report.summary.coherence, 0.0, 100.0);
  std::string out =
      "<section class=\"verdict verdict-" + status +
      "\" aria-labelledby=\"h-verdict\">\n"
      "<div class=\"verdict-main\"><p class=\"eyebrow\">Verdict</p><h2 id=\"h-verdict\" "
      "class=\"status\">" +
      status +
      "</h2></div>\n"
      "<div class=\"score\"><p class=\"eyebrow\">Coherence</p><p class=\"score-value\">" +
      num(report.summary.coherence) +
      "<span> / 100</span></p><div class=\"meter\"><div "
      "class=\"meter-fill " +
      css.add_class("sc", "width:" + page::pct(score / 100)) +
      "\"></div></div></div>\n<div class=\"reasons\"><p class=\"eyebrow\">Why</p>";
  if (report.verdict.reasons.empty()) {
    out += "<p>Nothing crossed the policy's thresholds.</p>";
  } else {
    out += "<ul>";
    for (const auto& r : report.verdict.reasons) out += "<li>" + html_escape(r) + "</li>";
    out += "</ul>";
  }
  return out + "</div>\n</section>\n";
}

std::string notes_block(const Report& report, const HtmlAssets& assets) {
  if (report.notes.empty() && assets.notes.empty()) return "";
  std::string out =
      "<section class=\"card\" aria-labelledby=\"h-notes\">\n<h2 id=\"h-notes\">Notes</h2>\n<ul>";
  for (const auto& n : report.notes) out += "<li>" + html_escape(n) + "</li>";
  for (const auto& n : assets.notes) out += "<li>" + html_escape(n) + "</li>";
  return out + "</ul>\n</section>\n";
}

// The legends shared by every panel set, as CSS background images so each
// is embedded once.
void add_legend_rules(const PanelLegends& legends, page::CssRules& css) {
  const EncodedImage& wheel = legends.flow_wheel;
  const EncodedImage& bar = legends.warp_error_bar;
  if (!wheel.empty())
    css.add_rule(".wheel{background-image:url(\"" + data_uri(wheel.mime, wheel.bytes) + "\")}");
  if (!bar.empty())
    css.add_rule(".colour-bar{background-image:url(\"" + data_uri(bar.mime, bar.bytes) + "\")}");
}

std::string file_name(const std::string& path) {
  const std::string name = std::filesystem::path(path).filename().string();
  return name.empty() ? path : name;
}

}  // namespace

std::string render_clip_page(const Report& unordered, const HtmlAssets& assets,
                             const HtmlOptions& options) {
  const Report report = page::in_registry_order(unordered);
  page::CssRules css;
  add_legend_rules(assets.legends, css);
  std::string body;
  body += "<header class=\"top\"><p class=\"brand\">clipwarden \u00b7 clip report</p><h1>" +
          html_escape(file_name(report.clip.path)) + "</h1></header>\n<main>\n";
  body += verdict_block(report, css);
  body += caution_block(report);
  body += facts_block(report, options);
  body += page::timeline_section(report, assets, css);
  body += page::panels_section(report, assets);
  body += page::segments_table(report, assets);
  body += page::objects_table(report);
  body += page::summary_table(report);
  body += notes_block(report, assets);
  body +=
      "</main>\n<footer>Written by " + html_escape(report.tool_name) + " " +
      html_escape(report.tool_version.empty() ? version() : report.tool_version) + " (" +
      kReportSchema +
      "). Values are measured at the analysis working size; the JSON report beside this page holds "
      "every number.</footer>\n";

  const std::string style = std::string(asset("clip.css")) + css.text();
  const std::string script = std::string(asset("clip.js"));
  std::string html =
      "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
      "<meta http-equiv=\"Content-Security-Policy\" content=\"" +
      content_security_policy(style, script) +
      "\">\n"
      "<meta name=\"referrer\" content=\"no-referrer\">\n"
      "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n<title>" +
      html_escape(file_name(report.clip.path)) + " \u2014 " + to_string(report.verdict.status) +
      " \u2014 clipwarden</title>\n<style>" + style + "</style>\n</head>\n<body>\n" + body +
      "<script type=\"application/json\" id=\"fl-data\">" + page::timeline_data_json(report) +
      "</script>\n<script>" + script + "</script>\n</body>\n</html>\n";
  return html;
}

}  // namespace clipwarden
