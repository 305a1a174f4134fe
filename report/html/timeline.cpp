// The timeline: one small SVG chart per metric on a shared time axis, the
// segments shaded across all of them, focusable segment markers, a
// thumbnail strip and the time axis. Positions along the axis are CSS
// classes (see page_parts.h).
#include <algorithm>
#include <cmath>
#include <cstdio>

#include "report/html/html_escape.h"
#include "report/html/page_parts.h"

namespace clipwarden::page {
namespace {

constexpr double kChartW = 1000;  // SVG user units across the track
constexpr double kChartH = 60;
constexpr size_t kMaxColumns = 1000;  // longer series are drawn as min/max per column

std::string fmt_xy(double x, double y) {
  char buf[48];
  std::snprintf(buf, sizeof buf, "%.1f %.1f", x, y);
  return buf;
}

// The polyline of a series; breaks where a value is undefined. Beyond
// kMaxColumns frames each column draws its min and max, so peaks survive.
std::string series_path(const std::vector<double>& values, const std::vector<double>& times,
                        const TimeAxis& axis, double lo, double hi) {
  auto y_of = [&](double v) { return kChartH - 3 - (v - lo) / (hi - lo) * (kChartH - 6); };
  auto x_of = [&](double t) { return axis.fraction(t + axis.frame_interval_s / 2) * kChartW; };
  std::string d;
  bool pen_down = false;
  const size_t n = std::min(values.size(), times.size());
  if (n <= kMaxColumns) {
    for (size_t i = 0; i < n; ++i) {
      if (!std::isfinite(values[i])) {
        pen_down = false;
        continue;
      }
      d += (pen_down ? "L" : "M") + fmt_xy(x_of(times[i]), y_of(values[i]));
      pen_down = true;
    }
    return d;
  }
  size_t i = 0;
  for (size_t column = 0; column < kMaxColumns && i < n; ++column) {
    const double column_end = axis.t0 + axis.span_s * (column + 1) / kMaxColumns;
    double mn = INFINITY, mx = -INFINITY;
    for (; i < n && times[i] < column_end; ++i)
      if (std::isfinite(values[i])) mn = std::min(mn, values[i]), mx = std::max(mx, values[i]);
    if (!std::isfinite(mn)) {
      pen_down = false;
      continue;
    }
    const double x = (column + 0.5) * kChartW / kMaxColumns;
    d += (pen_down ? "L" : "M") + fmt_xy(x, y_of(mn)) + "L" + fmt_xy(x, y_of(mx));
    pen_down = true;
  }
  return d;
}

std::string segment_title(const Segment& s) {
  return s.metric + " \u00b7 " + severity_name(s.severity) + " \u00b7 " + seconds(s.start_s) +
         "\u2013" + seconds(s.end_s) + " \u00b7 peak " + num(s.peak) + " at frame " +
         std::to_string(s.peak_frame);
}

bool has_panel(const HtmlAssets& assets, int64_t frame) {
  return std::any_of(assets.panels.begin(), assets.panels.end(),
                     [&](const PanelImages& p) { return p.frame_index == frame; });
}

std::string chart_row(const std::string& metric, const MetricSeries* series, const Report& report,
                      const HtmlAssets& assets, const TimeAxis& axis, CssRules& css) {
  double lo = 0, hi = 0;
  if (series)
    for (double v : series->values)
      if (std::isfinite(v)) lo = std::min(lo, v), hi = std::max(hi, v);
  const double shown_hi = hi;  // the label gives the data's own range
  if (hi - lo < 1e-12) hi = lo + 1;
  std::string svg =
      "<svg class=\"chart\" viewBox=\"0 0 1000 60\" preserveAspectRatio=\"none\" "
      "aria-hidden=\"true\">";
  std::string markers;
  for (size_t k = 0; k < report.segments.size(); ++k) {
    const Segment& s = report.segments[k];
    if (s.metric != metric) continue;
    const double a = axis.fraction(s.start_s), b = axis.fraction(s.end_s + axis.frame_interval_s);
    char rect[160];
    std::snprintf(
        rect, sizeof rect,
        "<rect class=\"seg-fill sev-%s\" x=\"%.1f\" y=\"0\" width=\"%.1f\" height=\"60\"/>",
        severity_name(s.severity), a * kChartW, std::max(2.0, (b - a) * kChartW));
    svg += rect;
    const std::string pos = css.add_class("mk", "left:" + pct(a) + ";width:" + pct(b - a));
    const std::string target = has_panel(assets, s.peak_frame)
                                   ? "#frame-" + std::to_string(s.peak_frame)
                                   : "#seg-" + std::to_string(k);
    markers += "<a class=\"seg-marker sev-" + std::string(severity_name(s.severity)) + " " + pos +
               "\" href=\"" + target + "\" data-seg=\"" + std::to_string(k) + "\" title=\"" +
               html_escape(segment_title(s)) + "\" aria-label=\"" + html_escape(segment_title(s)) +
               "\"></a>";
  }
  if (lo < 0) {
    char zero[120];
    const double y0 = kChartH - 3 - (0 - lo) / (hi - lo) * (kChartH - 6);
    std::snprintf(zero, sizeof zero,
                  "<line class=\"zero\" x1=\"0\" x2=\"1000\" y1=\"%.1f\" y2=\"%.1f\"/>", y0, y0);
    svg += zero;
  }
  if (series)
    svg += "<path class=\"line\" d=\"" +
           series_path(series->values, report.frame_times_s, axis, lo, hi) + "\"/>";
  svg += "</svg>";
  const std::string description = metric_description(metric);
  return "<div class=\"tl-label\" title=\"" + html_escape(description) +
         "\"><span class=\"metric\">" + html_escape(metric) + "</span><span class=\"range\">" +
         (lo < 0 ? num(lo) + " to " : "max ") + num(shown_hi) +
         "</span></div><div class=\"tl-track\" data-metric=\"" + html_escape(metric) + "\">" + svg +
         markers + "</div>\n";
}

// Tick step of 1, 2 or 5 times a power of ten giving about `target` ticks.
double nice_step(double span, int target) {
  const double raw = span / std::max(1, target);
  const double p = std::pow(10.0, std::floor(std::log10(raw)));
  for (double m : {1.0, 2.0, 5.0, 10.0})
    if (m * p >= raw) return m * p;
  return 10 * p;
}

std::string axis_row(const TimeAxis& axis, CssRules& css) {
  std::string ticks;
  const double step = nice_step(axis.span_s, 10);
  for (double t = std::ceil(axis.t0 / step) * step; t <= axis.t0 + axis.span_s + 1e-9; t += step) {
    char label[32];
    std::snprintf(label, sizeof label, step < 1 ? "%.1f" : "%.0f", t);
    ticks += "<span class=\"tick " + css.add_class("tk", "left:" + pct(axis.fraction(t))) + "\">" +
             label + "</span>";
  }
  return "<div class=\"tl-label\"><span class=\"metric\">time (s)</span></div><div "
         "class=\"tl-axis\">" +
         ticks + "</div>\n";
}

std::string thumbs_row(const HtmlAssets& assets, const TimeAxis& axis, CssRules& css) {
  if (assets.thumbnails.empty()) return "";
  std::string strip;
  for (size_t i = 0; i < assets.thumbnails.size(); ++i) {
    const Thumbnail& th = assets.thumbnails[i];
    const double end =
        i + 1 < assets.thumbnails.size() ? assets.thumbnails[i + 1].t_s : axis.t0 + axis.span_s;
    const std::string pos =
        css.add_class("th", "left:" + pct(axis.fraction(th.t_s)) +
                                ";width:" + pct(axis.fraction(end) - axis.fraction(th.t_s)));
    strip += img_tag(th.image, "frame " + std::to_string(th.frame_index) + " at " + seconds(th.t_s),
                     "thumb " + pos);
  }
  return "<div class=\"tl-label\"><span class=\"metric\">frames</span></div><div "
         "class=\"tl-thumbs\">" +
         strip + "</div>\n";
}

}  // namespace

std::string timeline_section(const Report& report, const HtmlAssets& assets, CssRules& css) {
  const TimeAxis axis = time_axis(report);
  std::string rows;
  rows += thumbs_row(assets, axis, css);
  std::vector<std::string> metrics;
  for (const auto& s : report.series) metrics.push_back(s.metric);
  for (const auto& s : report.segments)  // a segment of a metric without a series still shows
    if (std::find(metrics.begin(), metrics.end(), s.metric) == metrics.end())
      metrics.push_back(s.metric);
  for (const auto& m : metrics)
    rows += chart_row(m, report.find_series(m), report, assets, axis, css);
  rows += axis_row(axis, css);

  std::string bands;
  for (const auto& s : report.segments) {
    const double a = axis.fraction(s.start_s), b = axis.fraction(s.end_s + axis.frame_interval_s);
    bands += "<div class=\"band sev-" + std::string(severity_name(s.severity)) + " " +
             css.add_class("bd", "left:" + pct(a) + ";width:" + pct(b - a)) + "\"></div>";
  }
  return "<section class=\"card timeline\" aria-labelledby=\"h-timeline\">\n"
         "<h2 id=\"h-timeline\">Timeline</h2>\n"
         "<p class=\"hint\">Point at or click a chart to read a frame's values. Keys: <kbd>n</kbd> "
         "/ "
         "<kbd>p</kbd> next / previous flagged segment, <kbd>\u2190</kbd> <kbd>\u2192</kbd> step "
         "frames once a point is chosen, <kbd>Enter</kbd> on a segment opens its frame, "
         "<kbd>Esc</kbd> "
         "releases the cursor.</p>\n"
         "<div class=\"tl\" id=\"tl\">\n" +
         rows + "<div class=\"tl-overlay\" aria-hidden=\"true\">" + bands +
         "<div class=\"cursor\" id=\"tl-cursor\" hidden></div></div>\n</div>\n"
         "<div class=\"readout\" id=\"readout\" aria-live=\"polite\">" +
         std::to_string(report.frame_times_s.size()) + " frames, " + seconds(axis.span_s) + ", " +
         std::to_string(report.segments.size()) + " segment" +
         (report.segments.size() == 1 ? "" : "s") + ".</div>\n</section>\n";
}

}  // namespace clipwarden::page
