// Small formatting helpers of the per-clip page.
#include <algorithm>
#include <cmath>
#include <cstdio>

#include "analyzer/frame/series_math.h"
#include "analyzer/metrics/metric_descriptor.h"
#include "report/html/html_escape.h"
#include "report/html/page_parts.h"

namespace clipwarden::page {

std::string CssRules::add_class(const std::string& prefix, const std::string& body) {
  std::string name = prefix + std::to_string(next_++);
  text_ += "." + name + "{" + body + "}\n";
  return name;
}

std::string num(double v) {
  if (!std::isfinite(v)) return "\u2014";
  char buf[32];
  const double a = std::fabs(v);
  std::snprintf(buf, sizeof buf, (a != 0 && (a < 1e-3 || a >= 1e5)) ? "%.2e" : "%.4g", v);
  return buf;
}

std::string seconds(double s) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.2f\u00a0s", s);
  return buf;
}

std::string pct(double fraction) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.3f%%", 100.0 * std::clamp(fraction, 0.0, 1.0));
  return buf;
}

std::string metric_description(const std::string& metric) {
  const ColumnDescriptor* column = find_column(metric);
  if (!column) return "";
  return column->description + " Unit: " + column->unit + ".";
}

Report in_registry_order(const Report& report) {
  std::vector<std::string> order;
  for (const MetricDescriptor* m : metric_descriptors())
    for (const auto& c : m->columns) order.push_back(c.name);
  auto rank = [&](const std::string& name) {
    return std::find(order.begin(), order.end(), name) - order.begin();
  };
  Report out = report;
  std::stable_sort(out.series.begin(), out.series.end(),
                   [&](const auto& a, const auto& b) { return rank(a.metric) < rank(b.metric); });
  std::stable_sort(out.summary.metrics.begin(), out.summary.metrics.end(),
                   [&](const auto& a, const auto& b) { return rank(a.metric) < rank(b.metric); });
  return out;
}

const char* severity_name(Severity s) { return to_string(s); }

TimeAxis time_axis(const Report& report) {
  TimeAxis axis;
  const auto& t = report.frame_times_s;
  if (t.empty()) {
    axis.span_s = std::max(report.clip.duration_s, 1e-3);
    return axis;
  }
  // The typical frame interval: the median step, else the nominal rate.
  std::vector<double> steps;
  for (size_t i = 1; i < t.size(); ++i)
    if (t[i] > t[i - 1]) steps.push_back(t[i] - t[i - 1]);
  if (!steps.empty()) {
    axis.frame_interval_s = upper_median_in_place(steps);
  } else if (report.clip.fps > 0) {
    axis.frame_interval_s = 1.0 / report.clip.fps;
  } else {
    axis.frame_interval_s = 0.04;
  }
  axis.t0 = t.front();
  axis.span_s = std::max(1e-6, t.back() + axis.frame_interval_s - axis.t0);
  return axis;
}

std::string img_tag(const EncodedImage& image, const std::string& alt,
                    const std::string& css_class) {
  if (image.empty()) return "";
  return "<img class=\"" + css_class + "\" src=\"" + data_uri(image.mime, image.bytes) +
         "\" width=\"" + std::to_string(image.width_px) + "\" height=\"" +
         std::to_string(image.height_px) + "\" alt=\"" + html_escape(alt) + "\">";
}

namespace {

void append_number(std::string& out, double v, const char* format) {
  if (!std::isfinite(v)) {
    out += "null";
    return;
  }
  char buf[32];
  std::snprintf(buf, sizeof buf, format, v);
  out += buf;
}

// JSON string literal; characters that could end or confuse a <script>
// element (<, >, &) are written as \u escapes, so the data block can never
// close itself whatever a metric name contains.
std::string json_string(const std::string& s) {
  std::string dumped =
      nlohmann::json(s).dump(-1, ' ', false, nlohmann::json::error_handler_t::replace);
  std::string out;
  for (char c : dumped) {
    if (c == '<')
      out += "\\u003c";
    else if (c == '>')
      out += "\\u003e";
    else if (c == '&')
      out += "\\u0026";
    else
      out.push_back(c);
  }
  return out;
}

}  // namespace

std::string timeline_data_json(const Report& report) {
  const TimeAxis axis = time_axis(report);
  std::string out = "{\"t0\":";
  append_number(out, axis.t0, "%.6g");
  out += ",\"span\":";
  append_number(out, axis.span_s, "%.6g");
  out += ",\"dt\":";
  append_number(out, axis.frame_interval_s, "%.6g");
  out += ",\"times\":[";
  for (size_t i = 0; i < report.frame_times_s.size(); ++i) {
    if (i) out += ',';
    append_number(out, report.frame_times_s[i], "%.4f");
  }
  out += "],\"series\":[";
  for (size_t k = 0; k < report.series.size(); ++k) {
    if (k) out += ',';
    out += "{\"metric\":" + json_string(report.series[k].metric) + ",\"values\":[";
    const auto& v = report.series[k].values;
    for (size_t i = 0; i < v.size(); ++i) {
      if (i) out += ',';
      append_number(out, v[i], "%.5g");
    }
    out += "]}";
  }
  out += "],\"segments\":[";
  for (size_t k = 0; k < report.segments.size(); ++k) {
    const Segment& s = report.segments[k];
    if (k) out += ',';
    out += "{\"metric\":" + json_string(s.metric) + ",\"severity\":\"" + severity_name(s.severity) +
           "\",\"start_frame\":" + std::to_string(s.start_frame) +
           ",\"end_frame\":" + std::to_string(s.end_frame) +
           ",\"peak_frame\":" + std::to_string(s.peak_frame) + ",\"peak\":";
    append_number(out, s.peak, "%.5g");
    out += "}";
  }
  out += "]}";
  return out;
}

}  // namespace clipwarden::page
