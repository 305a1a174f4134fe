// Pieces of the per-clip page (report/html/clip_page.cpp). Every string
// from an input goes through html_escape; layout rules that depend on the
// data (positions along the timeline) are collected as CSS classes so the
// page needs no style attributes and its one <style> block can be pinned by
// hash in the Content-Security-Policy.
#pragma once

#include <string>
#include <vector>

#include "clipwarden/html_report.h"
#include "clipwarden/report.h"

namespace clipwarden::page {

// Generated CSS rules, appended to the stylesheet.
class CssRules {
 public:
  // Adds ".<prefix><n>{<body>}" and returns the class name.
  std::string add_class(const std::string& prefix, const std::string& body);
  void add_rule(const std::string& rule) { text_ += rule + "\n"; }
  const std::string& text() const { return text_; }

 private:
  std::string text_;
  int next_ = 0;
};

// "0.0123", "1.23e-05", "—" for undefined.
std::string num(double v);
// "2.13 s"
std::string seconds(double s);
// "12.3%" for a CSS position.
std::string pct(double fraction);
// What a report column measures and its unit, from its metric's descriptor
// (analyzer/metrics/metric_descriptor.h); "" for a column no metric writes.
std::string metric_description(const std::string& metric);
// The report with its per-frame series and metric summaries in registry
// column order (unregistered names after, as listed): a report read back
// from JSON (a gate's store hit) lists them by name, and its page must be
// the one written when the clip was analysed.
Report in_registry_order(const Report& report);
const char* severity_name(Severity s);

// The clip's time base: frame i spans [t_i, t_i + frame_interval_s).
struct TimeAxis {
  double t0 = 0;
  double span_s = 1;
  double frame_interval_s = 0;
  double fraction(double t) const { return span_s > 0 ? (t - t0) / span_s : 0; }
};
TimeAxis time_axis(const Report& report);

// <img> with a data: URI, or "" when the image is empty.
std::string img_tag(const EncodedImage& image, const std::string& alt,
                    const std::string& css_class);

// The page's sections.
std::string timeline_section(const Report& report, const HtmlAssets& assets, CssRules& css);
std::string panels_section(const Report& report, const HtmlAssets& assets);
std::string segments_table(const Report& report, const HtmlAssets& assets);
std::string objects_table(const Report& report);
std::string summary_table(const Report& report);

// The timeline's data for the page script, as JSON safe inside <script>.
std::string timeline_data_json(const Report& report);

}  // namespace clipwarden::page
