#include "analyzer/compare/compare_plot.h"

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

std::vector<PromptChange> prompt_changes(const Comparison& c, size_t column) {
  const auto& what = c.metrics[column].what;
  std::vector<PromptChange> out;
  for (const auto& p : c.pairs) {
    const double a = p.a_values[column], b = p.b_values[column];
    if (!std::isfinite(a) || !std::isfinite(b)) continue;
    out.push_back({&p, a, b, what.higher_is_better ? a - b : b - a});
  }
  std::stable_sort(out.begin(), out.end(),
                   [](const PromptChange& x, const PromptChange& y) { return x.worse > y.worse; });
  return out;
}

namespace {
// Geometry of the per-prompt chart, SVG user units.
constexpr double kChartWidth = 640, kChartHeight = 236;
constexpr double kChartLeft = 58, kChartRight = 630, kChartTop = 46, kChartBottom = 206;
constexpr size_t kNamedPrompts = 5;

std::string truncated(const std::string& name, size_t length) {
  if (name.size() <= length) return name;
  size_t cut = length;
  while (cut > 0 && (static_cast<unsigned char>(name[cut]) & 0xC0) == 0x80) --cut;  // UTF-8
  return name.substr(0, cut) + "\xE2\x80\xA6";
}
}  // namespace

std::string prompt_difference_chart(const Comparison& c, size_t column) {
  const auto& m = c.metrics[column];
  const auto changes = prompt_changes(c, column);
  double lo = 0, hi = 0;
  for (const auto& ch : changes) lo = std::min(lo, ch.worse), hi = std::max(hi, ch.worse);
  if (std::isfinite(m.seed_noise))
    lo = std::min(lo, -m.seed_noise), hi = std::max(hi, m.seed_noise);
  if (hi - lo <= 0) hi = 1, lo = -1;
  const double pad = (hi - lo) * 0.05;
  const double top = hi + pad, bottom = lo - pad;
  auto y = [&](double v) {
    return kChartBottom - (v - bottom) / (top - bottom) * (kChartBottom - kChartTop);
  };
  std::string svg = "<svg class=\"changes\" viewBox=\"0 0 " + num(kChartWidth) + " " +
                    num(kChartHeight) + "\" role=\"img\" aria-label=\"" +
                    html_escape(m.what.key() + ": B - A per prompt, worst first") + "\">";
  for (double t : ticks_for({bottom, top})) {
    svg += "<line class=\"grid\" x1=\"" + num(kChartLeft) + "\" x2=\"" + num(kChartRight) +
           "\" y1=\"" + num(y(t)) + "\" y2=\"" + num(y(t)) + "\"/><text class=\"tick\" x=\"" +
           num(kChartLeft - 5) + "\" y=\"" + num(y(t)) + "\" dy=\"0.32em\">" +
           html_escape(format_number(m.what.higher_is_better && t != 0 ? -t : t)) + "</text>";
  }
  if (std::isfinite(m.seed_noise) && m.seed_noise > 0)
    svg += "<rect class=\"noise\" x=\"" + num(kChartLeft) + "\" width=\"" +
           num(kChartRight - kChartLeft) + "\" y=\"" + num(y(m.seed_noise)) + "\" height=\"" +
           num(y(-m.seed_noise) - y(m.seed_noise)) + "\"><title>" +
           html_escape("seed-to-seed noise of one prompt's difference: \xC2\xB1" +
                       format_number(m.seed_noise)) +
           "</title></rect>";
  const double step = (kChartRight - kChartLeft) / std::max<size_t>(changes.size(), 1);
  const double width = std::max(step * 0.78, 0.4);
  for (size_t i = 0; i < changes.size(); ++i) {
    const auto& ch = changes[i];
    const char* kind = ch.worse > 0 ? "worse" : ch.worse < 0 ? "better" : "same";
    const double x = kChartLeft + step * static_cast<double>(i) + (step - width) / 2;
    const double y0 = y(0), y1 = y(ch.worse);
    svg += std::string("<rect class=\"") + kind + "\" x=\"" + num(x) + "\" width=\"" + num(width) +
           "\" y=\"" + num(std::min(y0, y1)) + "\" height=\"" +
           num(std::max(std::fabs(y1 - y0), 0.8)) + "\"><title>" +
           html_escape(ch.pair->key + ": A " + format_number(ch.a) + ", B " + format_number(ch.b)) +
           "</title></rect>";
  }
  svg += "<line class=\"axis\" x1=\"" + num(kChartLeft) + "\" x2=\"" + num(kChartRight) +
         "\" y1=\"" + num(y(0)) + "\" y2=\"" + num(y(0)) + "\"/>";
  // The worst prompts are named in a row above the plot, each joined to its
  // bar by a thin line, so names never overlap however narrow the bars are.
  const double slot = (kChartRight - kChartLeft) / kNamedPrompts;
  for (size_t i = 0; i < changes.size() && i < kNamedPrompts && changes[i].worse > 0; ++i) {
    const double bar = kChartLeft + step * (static_cast<double>(i) + 0.5);
    const double label = kChartLeft + slot * (static_cast<double>(i) + 0.5);
    svg += "<line class=\"leader\" x1=\"" + num(label) + "\" y1=\"17\" x2=\"" + num(bar) +
           "\" y2=\"" + num(y(changes[i].worse) - 2) + "\"/><text class=\"name\" x=\"" +
           num(label) + "\" y=\"13\">" + html_escape(truncated(changes[i].pair->key, 18)) +
           "<title>" + html_escape(changes[i].pair->key) + "</title></text>";
  }
  svg += "<text class=\"caption\" x=\"" + num(kChartLeft) + "\" y=\"" + num(kChartHeight - 8) +
         "\">" + std::to_string(changes.size()) + " prompts, worst in B first; bars up: B worse" +
         (std::isfinite(m.seed_noise) ? ", band: seed noise" : "") + "</text>";
  return svg + "</svg>";
}

}  // namespace clipwarden::html_detail
