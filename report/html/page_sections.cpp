// The per-frame panel sets and the tables of the per-clip page.
#include <algorithm>
#include <cmath>
#include <cstdio>

#include "clipwarden/inspect.h"
#include "report/html/html_escape.h"
#include "analyzer/core/object_boxes.h"
#include "report/html/page_parts.h"

namespace clipwarden::page {
namespace {

std::string figure(const EncodedImage& image, const std::string& alt,
                   const std::string& caption_html, const std::string& extra_html = "") {
  if (image.empty()) return "";
  return "<figure>" + img_tag(image, alt, "panel") + extra_html + "<figcaption>" + caption_html +
         "</figcaption></figure>\n";
}

std::string severity_tag(Severity s) {
  const std::string name = severity_name(s);
  return "<span class=\"sev sev-" + name + "\">" + name + "</span>";
}

std::string frame_ref(int64_t frame) { return "frame\u00a0" + std::to_string(frame); }

// The heat map's scale: ticks evenly spaced along the bar, labelled with the
// squared error each position stands for (the bar is in sqrt units).
std::string colour_bar_html(const PanelLegends& legends) {
  std::string ticks;
  for (const auto& [position, error] : legends.warp_error_ticks)
    ticks += "<span>" + std::string(position >= 1 ? "\u2265\u00a0" : "") + num(error) + "</span>";
  return "<div class=\"colour-bar\" role=\"img\" aria-label=\"colour scale of the squared error "
         "from 0 to " +
         num(kWarpErrorHeatMax) + " and above\"></div><div class=\"scale\">" + ticks + "</div>";
}

std::string looks_block(const PanelImages& p) {
  if (p.objects.empty()) return "";
  std::string out = "<h4>Tracked objects at this frame</h4>\n<div class=\"looks\">\n";
  out += figure(p.current_with_boxes, "current frame with object boxes",
                "Current frame, boxes of the objects followed (working-frame pixels)");
  for (const auto& look : p.objects) {
    const std::string id = std::to_string(look.object_id);
    out += "<figure class=\"look-pair\"><div class=\"look-imgs\">" +
           img_tag(look.first_look, "object " + id + " at its first frame", "look") +
           img_tag(look.current_look, "object " + id + " at " + frame_ref(p.frame_index), "look") +
           "</div><figcaption>Object #" + id + ": first look (" + frame_ref(look.first_frame) +
           ") beside its look now (" + frame_ref(p.frame_index) + ")" +
           (look.first_look.empty() ? "; the first look could not be read back" : "") +
           "</figcaption></figure>\n";
  }
  return out + "</div>\n";
}

std::string panel_set(const Report& report, const PanelImages& p, const PanelLegends& legends) {
  const std::string f = std::to_string(p.frame_index);
  std::string out = "<section class=\"card panel-set\" id=\"frame-" + f +
                    "\" aria-labelledby=\"h-frame-" + f + "\">\n<h3 id=\"h-frame-" + f +
                    "\">Frame " + f + " <span class=\"muted\">at " + seconds(p.t_s) +
                    "</span></h3>\n<ul class=\"seg-tags\">";
  for (size_t k = 0; k < report.segments.size(); ++k) {
    const Segment& s = report.segments[k];
    if (s.peak_frame != p.frame_index) continue;
    out += "<li>" + severity_tag(s.severity) + " <a href=\"#seg-" + std::to_string(k) + "\">" +
           html_escape(s.metric) + "</a>, " + seconds(s.start_s) + "\u2013" + seconds(s.end_s) +
           ", worst value " + num(s.peak) + " here</li>";
  }
  out += "</ul>\n";
  if (!p.has_previous) {
    return out +
           "<p class=\"nums\">Frame 0 has no previous frame, so there is no flow, warp or "
           "occlusion "
           "to show.</p>\n<div class=\"figs\">" +
           figure(p.current, "current frame " + f, "<b>Current</b> " + frame_ref(p.frame_index)) +
           "</div>\n</section>\n";
  }
  out += "<p class=\"nums\">At this frame: warp error " + num(p.mean_warp_error) +
         " (non-occluded pixels) \u00b7 occluded " + num(p.occluded_pct) +
         "\u00a0% \u00b7 fastest motion " + num(p.max_flow_px) +
         "\u00a0px per frame</p>\n<div class=\"figs\">\n";
  out += figure(p.previous, "previous frame",
                "<b>Previous</b> \u00b7 " + frame_ref(p.frame_index - 1));
  out += figure(p.current, "current frame", "<b>Current</b> \u00b7 " + frame_ref(p.frame_index));
  out += figure(p.warped_previous, "previous frame warped onto the current one",
                "<b>Previous warped onto current</b>");
  out += figure(p.warp_error_heat, "warp error heat map",
                "<b>Warp error</b> \u00b7 squared RGB difference per pixel", colour_bar_html(legends));
  out += figure(
      p.flow_colour, "optical flow in the Middlebury colour coding",
      "<b>Motion</b> \u00b7 full colour\u00a0=\u00a0" + num(p.max_flow_px) + "\u00a0px per frame",
      "<div class=\"wheel\" role=\"img\" aria-label=\"flow colour wheel\"></div>");
  out += figure(p.occlusion, "occlusion mask", "<b>Occlusion</b> \u00b7 red: not counted");
  return out + "</div>\n" + looks_block(p) + "</section>\n";
}

std::string scalar_text(const nlohmann::json& v) {
  if (v.is_number()) return num(v.get<double>());
  if (v.is_boolean()) return v.get<bool>() ? "yes" : "no";
  if (v.is_string()) return html_escape(v.get<std::string>());
  if (v.is_null()) return "\u2014";
  return "";
}

bool is_scalar(const nlohmann::json& v) { return v.is_primitive(); }

// A number, or a dash where it is unknown (as JSON null reads).
std::string number_cell(double v) { return std::isfinite(v) ? num(v) : std::string("\u2014"); }

// An object's drift over the whole clip as a small line (x: frame across the
// clip, y: drift on a scale shared by all objects, so rows compare).
std::string drift_sparkline(const TrackedObject& o, int64_t frame_count, double max_drift) {
  const auto samples = object_drift_samples(o);
  if (samples.empty() || frame_count < 2 || !(max_drift > 0)) return "\u2014";
  std::string d;
  bool pen_down = false;
  for (const auto& [frame, value] : samples) {
    if (!std::isfinite(value)) {
      pen_down = false;
      continue;
    }
    char xy[48];
    std::snprintf(xy, sizeof xy, "%c%.1f %.1f", pen_down ? 'L' : 'M',
                  120.0 * frame / (frame_count - 1),
                  22.0 - 20.0 * std::clamp(value / max_drift, 0.0, 1.0));
    d += xy;
    pen_down = true;
  }
  return "<svg class=\"spark\" viewBox=\"0 0 120 24\" role=\"img\" aria-label=\"drift of object " +
         std::to_string(o.id) + " over the clip\"><path d=\"" + d + "\"/></svg>";
}

}  // namespace

std::string panels_section(const Report& report, const HtmlAssets& assets) {
  // Every set carries short captions; the explanation is given once.
  if (report.segments.empty()) return "";
  std::string out =
      "<section class=\"panels\" aria-labelledby=\"h-panels\">\n<h2 id=\"h-panels\">Worst "
      "frames of the flagged segments</h2>\n";
  if (assets.panels.empty()) {
    out += "<p class=\"card\">No frame pictures in this page";
    out += assets.notes.empty() ? "." : ": " + html_escape(assets.notes.front());
    return out + "</p>\n</section>\n";
  }
  out +=
      "<details class=\"card how-to\" open><summary>How to read these pictures</summary><dl>"
      "<dt>Previous, current</dt><dd>The two frames of the pair, at the analysis working size; the "
      "sets are ordered worst first.</dd>"
      "<dt>Previous warped onto current</dt><dd>The previous frame moved by the optical flow so it "
      "should look like the current one. Where it does not, motion does not explain the "
      "change.</dd>"
      "<dt>Warp error</dt><dd>Per pixel, the squared difference of current and warped previous "
      "summed over R, G and B (each 0\u20131), on a fixed scale from 0 (dark) to " +
      num(kWarpErrorHeatMax) +
      " and above (bright), so sets and clips compare; the scale is "
      "stretched (square root) so that small errors show. Its mean over the "
      "counted pixels is the frame's warp_error (Lai et al. 2018). Grey stripes are occluded "
      "pixels, which are not counted.</dd>"
      "<dt>Motion</dt><dd>The optical flow from previous to current in the Middlebury colour "
      "coding "
      "(Baker et al. 2011): hue gives the direction (see the wheel: right red, down yellow, left "
      "cyan, up violet), saturation the speed; white is still; full colour is the fastest motion "
      "in the frame, given under the picture.</dd>"
      "<dt>Occlusion</dt><dd>Red pixels fail the forward\u2013backward flow check (Sundaram et al. "
      "2010): newly uncovered, covered, or badly tracked. They are left out of the warp "
      "error.</dd></dl></details>\n";
  for (const auto& p : assets.panels) out += panel_set(report, p, assets.legends);
  return out + "</section>\n";
}

std::string segments_table(const Report& report, const HtmlAssets& assets) {
  std::string out =
      "<section class=\"card\" aria-labelledby=\"h-segments\">\n<h2 "
      "id=\"h-segments\">Segments</h2>\n";
  if (report.segments.empty())
    return out + "<p>No incoherent segments were found.</p>\n</section>\n";
  out +=
      "<div "
      "class=\"table-wrap\"><table><thead><tr><th>#</th><th>metric</th><th>severity</"
      "th><th>frames</th>"
      "<th>time</th><th>length</th><th>peak</th><th>worst frame</th></tr></thead><tbody>\n";
  for (size_t k = 0; k < report.segments.size(); ++k) {
    const Segment& s = report.segments[k];
    const bool pictured =
        std::any_of(assets.panels.begin(), assets.panels.end(),
                    [&](const PanelImages& p) { return p.frame_index == s.peak_frame; });
    const std::string worst = pictured ? "<a href=\"#frame-" + std::to_string(s.peak_frame) +
                                             "\">" + std::to_string(s.peak_frame) + "</a>"
                                       : std::to_string(s.peak_frame);
    out += "<tr id=\"seg-" + std::to_string(k) + "\"><td>" + std::to_string(k + 1) + "</td><td>" +
           html_escape(s.metric) + "</td><td>" + severity_tag(s.severity) + "</td><td>" +
           std::to_string(s.start_frame) + "\u2013" + std::to_string(s.end_frame) + "</td><td>" +
           seconds(s.start_s) + "\u2013" + seconds(s.end_s) + "</td><td>" +
           std::to_string(s.end_frame - s.start_frame + 1) + " fr</td><td class=\"num\">" +
           num(s.peak) + "</td><td>" + worst + "</td></tr>\n";
  }
  return out + "</tbody></table></div>\n</section>\n";
}

std::string objects_table(const Report& report) {
  if (report.objects.empty()) return "";
  // The object's clip-level figures, one column each, by their report keys.
  const std::pair<const char*, std::string (*)(const TrackedObject&)> columns[] = {
      {"color_de00_rate_per_s", [](const TrackedObject& o) { return number_cell(o.color_de00_rate_per_s); }},
      {"drift_rate_per_s", [](const TrackedObject& o) { return number_cell(o.drift_rate_per_s); }},
      {"kind", [](const TrackedObject& o) { return std::string(to_string(o.kind)); }},
      {"peak_drift", [](const TrackedObject& o) { return number_cell(o.peak_drift); }},
      {"peak_frame",
       [](const TrackedObject& o) {
         return o.peak_frame ? num(static_cast<double>(*o.peak_frame)) : std::string("\u2014");
       }},
      {"reference_frame",
       [](const TrackedObject& o) { return num(static_cast<double>(o.reference_frame)); }},
  };
  double max_drift = 0;
  for (const auto& o : report.objects)
    for (const auto& [frame, value] : object_drift_samples(o))
      if (std::isfinite(value)) max_drift = std::max(max_drift, value);
  const int64_t frame_count = static_cast<int64_t>(report.frame_times_s.size());
  std::string out =
      "<section class=\"card\" aria-labelledby=\"h-objects\">\n<h2 id=\"h-objects\">Tracked "
      "objects (drift)</h2>\n<p class=\"hint\">Drift over the clip on one scale for all objects "
      "(0 to " +
      num(max_drift) +
      ").</p>\n<div class=\"table-wrap\"><table><thead><tr><th>object</th>"
      "<th>frames</th><th>drift over the clip</th><th>ends</th><th>vanished</th>";
  for (const auto& [key, cell] : columns) out += std::string("<th>") + key + "</th>";
  out += "</tr></thead><tbody>\n";
  for (const auto& o : report.objects) {
    out += "<tr><td>#" + std::to_string(o.id) + "</td><td>" + std::to_string(o.first_frame) +
           "\u2013" + std::to_string(o.last_frame) + "</td><td>" +
           drift_sparkline(o, frame_count, max_drift) + "</td><td>" + html_escape(o.end_reason) +
           "</td><td>" + (o.vanished ? "yes" : "no") + "</td>";
    for (const auto& [key, cell] : columns) out += "<td class=\"num\">" + cell(o) + "</td>";
    out += "</tr>\n";
  }
  return out + "</tbody></table></div>\n</section>\n";
}

std::string summary_table(const Report& report) {
  std::string out =
      "<section class=\"card\" aria-labelledby=\"h-summary\">\n<h2 id=\"h-summary\">Per-metric "
      "summary</h2>\n<div class=\"table-wrap\"><table><thead><tr><th>metric</th><th>mean</th>"
      "<th>p50</th><th>p95</th><th>max</th><th>clip-level details</th></tr></thead><tbody>\n";
  std::vector<MetricSummary> rows = report.summary.metrics;
  if (report.summary.details.is_object())
    for (const auto& [name, v] : report.summary.details.items())
      if (!report.find_summary(name)) rows.push_back({name});  // clip-level details only
  for (const auto& m : rows) {
    std::string details;
    if (report.summary.details.contains(m.metric) && report.summary.details[m.metric].is_object())
      for (const auto& [k, v] : report.summary.details[m.metric].items())
        // Long texts (rules, cautions) are shown elsewhere or belong in the JSON.
        if (is_scalar(v) && !(v.is_string() && v.get<std::string>().size() > 60))
          details += (details.empty() ? "" : " \u00b7 ") + html_escape(k) + " " + scalar_text(v);
    out += "<tr><td title=\"" + html_escape(metric_description(m.metric)) + "\">" +
           html_escape(m.metric) + "</td><td class=\"num\">" + num(m.mean) +
           "</td><td class=\"num\">" + num(m.p50) + "</td><td class=\"num\">" + num(m.p95) +
           "</td><td class=\"num\">" + num(m.max) + "</td><td>" + details + "</td></tr>\n";
  }
  return out + "</tbody></table></div>\n</section>\n";
}

}  // namespace clipwarden::page
