#include "analyzer/cli/metric_listing.h"

#include <cmath>
#include <cstdio>

#include "analyzer/metrics/metric_descriptor.h"

namespace clipwarden::cli {
namespace {

// Shortest form that reads back to the same double for the levels used
// (0.012, 35, 0.0012...); kNever reads "never".
std::string level(double v) {
  if (std::isinf(v)) return "never";
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.6g", v);
  return buf;
}

std::string optional_level(const std::optional<double>& v) { return v ? level(*v) : "off"; }

// A Markdown table cell: a '|' would end the cell.
std::string cell(const std::string& s) {
  std::string out;
  for (char c : s) {
    if (c == '|') out += '\\';
    out += c;
  }
  return out;
}

std::string segment_text(const SegmentRule& s) {
  return "segments enter " + level(s.enter) + ", leave " + level(s.leave) + ", at least " +
         std::to_string(s.min_frames) + " frame(s), merged across " +
         std::to_string(s.merge_gap_frames) + ", baseline k " + level(s.baseline_k) +
         ", peak review " + level(s.review_peak) + " / reject " + level(s.reject_peak);
}

std::string default_rule_text(const DefaultRule& rule) {
  std::string out;
  if (rule.segment) out = segment_text(*rule.segment);
  for (const auto& r : rule.statistics)
    out += (out.empty() ? "" : "; ") + r.statistic + " review " + optional_level(r.review) +
           " / reject " + optional_level(r.reject);
  return out.empty() ? "none" : out;
}

nlohmann::ordered_json level_json(double v) {
  return std::isfinite(v) ? nlohmann::ordered_json(v) : nlohmann::ordered_json(nullptr);
}

nlohmann::ordered_json optional_json(const std::optional<double>& v) {
  return v ? nlohmann::ordered_json(*v) : nlohmann::ordered_json(nullptr);
}

}  // namespace

std::string metric_listing_text() {
  std::string out;
  for (const MetricDescriptor* m : metric_descriptors()) {
    out += m->name + "\n  method: " + m->citation + "\n";
    for (const ColumnDescriptor& c : m->columns) {
      out += "  column " + c.name + " (" + c.unit + "; better: " + to_string(c.better) + ")\n";
      out += "    " + c.description + "\n";
      out += "    frame rate: " + std::string(to_string(c.frame_rate)) + ", " + c.frame_rate_text +
             "\n";
      out += "    default rule: " + default_rule_text(c.default_rule) + "\n";
    }
  }
  return out;
}

nlohmann::ordered_json metric_listing_json() {
  nlohmann::ordered_json metrics = nlohmann::ordered_json::array();
  for (const MetricDescriptor* m : metric_descriptors()) {
    nlohmann::ordered_json columns = nlohmann::ordered_json::array();
    for (const ColumnDescriptor& c : m->columns) {
      nlohmann::ordered_json segment = nullptr;
      if (const auto& s = c.default_rule.segment)
        segment = {{"enter", s->enter},
                   {"leave", s->leave},
                   {"min_frames", s->min_frames},
                   {"merge_gap_frames", s->merge_gap_frames},
                   {"baseline_k", s->baseline_k},
                   {"review_peak", level_json(s->review_peak)},
                   {"reject_peak", level_json(s->reject_peak)}};
      nlohmann::ordered_json statistics = nlohmann::ordered_json::array();
      for (const auto& r : c.default_rule.statistics)
        statistics.push_back({{"statistic", r.statistic},
                              {"review", optional_json(r.review)},
                              {"reject", optional_json(r.reject)}});
      columns.push_back({{"name", c.name},
                         {"unit", c.unit},
                         {"description", c.description},
                         {"better", to_string(c.better)},
                         {"frame_rate", to_string(c.frame_rate)},
                         {"frame_rate_text", c.frame_rate_text},
                         {"default_rule", {{"segment", segment}, {"statistics", statistics}}},
                         {"catches", c.catches}});
    }
    metrics.push_back({{"name", m->name}, {"citation", m->citation}, {"columns", columns}});
  }
  return metrics;
}

std::string metric_table_markdown() {
  std::string out =
      "| column | metric | unit | better | frame rate | what it measures |\n"
      "| --- | --- | --- | --- | --- | --- |\n";
  for (const MetricDescriptor* m : metric_descriptors())
    for (const ColumnDescriptor& c : m->columns)
      out += "| `" + c.name + "` | `" + m->name + "` | " + cell(c.unit) + " | " +
             to_string(c.better) + " | " + to_string(c.frame_rate) + " | " + cell(c.description) +
             " |\n";
  return out;
}

std::string metric_reference_markdown() {
  std::string out;
  for (const MetricDescriptor* m : metric_descriptors()) {
    out += "### `" + m->name + "`\n\nMethod: " + m->citation + ".\n\n";
    for (const ColumnDescriptor& c : m->columns) {
      out += "- `" + c.name + "`: " + c.description + "\n";
      out += "  - unit: " + c.unit + "; better: " + to_string(c.better) + "\n";
      out += "  - frame rate (`" + std::string(to_string(c.frame_rate)) +
             "`): " + c.frame_rate_text + "\n";
      out += "  - default rule: " + default_rule_text(c.default_rule) + "\n";
    }
    out += "\n";
  }
  return out;
}

}  // namespace clipwarden::cli
