#include "report/html/compare_plot.h"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "report/html/html_escape.h"

namespace clipwarden::html_detail {
namespace {

// Plot geometry in SVG user units; the page scales the SVG to its column.
constexpr double kWidth = 260, kHeight = 186;
constexpr double kTop = 12, kBottom = 158, kAxisA = 100, kAxisB = 220;
constexpr double kGridLeft = 56, kGridRight = 250, kLabelBaseline = 178;

struct Scale {
  double lo, hi;
  double y(double v) const { return kBottom - (v - lo) / (hi - lo) * (kBottom - kTop); }
};

Scale scale_for(const Comparison& c, size_t column) {
  double lo = INFINITY, hi = -INFINITY;
  for (const auto& p : c.pairs)
    for (double v : {p.a_values[column], p.b_values[column]})
      if (std::isfinite(v)) lo = std::min(lo, v), hi = std::max(hi, v);
  if (!std::isfinite(lo)) return {0, 1};
  if (hi - lo < 1e-12 * std::max(1.0, std::fabs(hi))) {
    const double pad = std::max(1.0, std::fabs(hi) * 0.1);
    return {lo - pad, hi + pad};
  }
  const double pad = (hi - lo) * 0.04;
  return {lo - pad, hi + pad};
}

// Round tick steps of 1, 2 or 5 times a power of ten, about four per axis.
std::vector<double> ticks_for(const Scale& s) {
  const double raw = (s.hi - s.lo) / 4;
  const double power = std::pow(10.0, std::floor(std::log10(raw)));
  double step = power;
  for (double m : {1.0, 2.0, 5.0, 10.0})
    if (m * power >= raw) {
      step = m * power;
      break;
    }
  std::vector<double> ticks;
  for (double t = std::ceil(s.lo / step) * step; t <= s.hi + step * 1e-9; t += step)
    ticks.push_back(std::fabs(t) < step * 1e-9 ? 0.0 : t);
  return ticks;
}

std::string num(double v) {
  char buffer[32];
  std::snprintf(buffer, sizeof buffer, "%.1f", v);
  return buffer;
}

const char* change_class(double a, double b, bool higher_is_better) {
  if (a == b) return "same";
  return (b > a) == higher_is_better ? "better" : "worse";
}

}  // namespace

std::string format_number(double v) {
  if (!std::isfinite(v)) return "\xE2\x80\x93";  // en dash
  char buffer[32];
  std::snprintf(buffer, sizeof buffer, "%.4g", v);
  return buffer;
}

std::string paired_dot_plot(const Comparison& c, size_t column) {
  const auto& what = c.metrics[column].what;
  const Scale s = scale_for(c, column);
  std::string svg = "<svg class=\"dots\" viewBox=\"0 0 " + num(kWidth) + " " + num(kHeight) +
                    "\" role=\"img\" aria-label=\"" +
                    html_escape(what.key() + ": A and B per key") + "\">";
  for (double t : ticks_for(s)) {
    const std::string y = num(s.y(t));
    svg += "<line class=\"grid\" x1=\"" + num(kGridLeft) + "\" x2=\"" + num(kGridRight) +
           "\" y1=\"" + y + "\" y2=\"" + y + "\"/>";
    svg += "<text class=\"tick\" x=\"" + num(kGridLeft - 5) + "\" y=\"" + y + "\" dy=\"0.32em\">" +
           html_escape(format_number(t)) + "</text>";
  }
  for (double x : {kAxisA, kAxisB})
    svg += "<line class=\"axis\" x1=\"" + num(x) + "\" x2=\"" + num(x) + "\" y1=\"" + num(kTop) +
           "\" y2=\"" + num(kBottom) + "\"/>";
  for (auto [x, label] : {std::pair{kAxisA, "A"}, std::pair{kAxisB, "B"}})
    svg += "<text class=\"side\" x=\"" + num(x) + "\" y=\"" + num(kLabelBaseline) + "\">" + label +
           "</text>";
  // Worse last, so the lines that matter are drawn on top.
  for (const char* layer : {"same", "better", "worse"}) {
    for (const auto& p : c.pairs) {
      const double a = p.a_values[column], b = p.b_values[column];
      if (!std::isfinite(a) || !std::isfinite(b)) continue;
      const char* kind = change_class(a, b, what.higher_is_better);
      if (std::string(kind) != layer) continue;
      const std::string ya = num(s.y(a)), yb = num(s.y(b));
      svg += std::string("<g class=\"") + kind + "\"><title>" +
             html_escape(p.key + ": A " + format_number(a) + ", B " + format_number(b)) +
             "</title><line x1=\"" + num(kAxisA) + "\" y1=\"" + ya + "\" x2=\"" + num(kAxisB) +
             "\" y2=\"" + yb + "\"/><circle cx=\"" + num(kAxisA) + "\" cy=\"" + ya +
             "\" r=\"3\"/><circle cx=\"" + num(kAxisB) + "\" cy=\"" + yb + "\" r=\"3\"/></g>";
    }
  }
  return svg + "</svg>";
}

}  // namespace clipwarden::html_detail
