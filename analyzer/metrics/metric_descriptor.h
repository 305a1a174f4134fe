// What the rest of the program knows about a metric, declared once beside
// the metric's code (analyzer/metrics/*_metric.cpp) and listed in
// registry.cpp. The report page's column descriptions, compare's better
// direction, the default policy, `clipwarden metrics`, docs/metrics.md and
// the README's metric table all read (or are checked against) these.
//
// A metric writes one or more per-frame columns; everything a reader of a
// column needs is on the column. The metric adds its name and the published
// method it follows.
#pragma once

#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "clipwarden/policy.h"

namespace clipwarden {

// Which way is better for a column's values.
enum class Better {
  lower,   // a defect measure: more is worse
  higher,  // a quality measure: more is better
  none,    // describes the content, not its quality: never judged or compared
};

// How a column's value changes with the clip's frame rate, as a flag a
// program can act on; ColumnDescriptor::frame_rate_text says it in words.
enum class FrameRateDependence {
  none,            // the same content reads the same at any frame rate
  per_frame_pair,  // compares adjacent frames: motion per frame, so the value, grows as fps falls
  per_k_frames,    // compares frames a fixed number of frames apart: spans k/fps seconds
  per_second,      // windows and rates are in seconds of real time, so fps cancels out
  fps_squared,     // a per-frame difference scaled by fps^2: frame-to-frame noise grows with it
};

// As a SegmentRule's review_peak or reject_peak: that severity is never
// given from a segment's peak.
inline constexpr double kNever = std::numeric_limits<double>::infinity();
// As a StatisticRule's review or reject level: that level is off.
inline constexpr std::nullopt_t kOff = std::nullopt;

// One clip-level statistic rule of the default policy: {statistic, review,
// reject} (policy.h's SummaryRule without the metric, which is the column).
struct StatisticRule {
  std::string statistic;
  std::optional<double> review;
  std::optional<double> reject;
};

// The default policy's rule for one column: its segment rule, if its series
// becomes segments, and its clip-level statistic rules.
struct DefaultRule {
  std::optional<SegmentRule> segment;
  std::vector<StatisticRule> statistics;
};

struct ColumnDescriptor {
  std::string name;         // the key in report.frames and summary.metrics
  std::string unit;         // what one unit of the value is
  std::string description;  // one line, shown on the page beside the column
  Better better = Better::lower;
  FrameRateDependence frame_rate = FrameRateDependence::none;
  std::string frame_rate_text;  // the dependence in words
  DefaultRule default_rule;
  // The `clipwarden inject` defect classes (their SPEC names) whose
  // segments this column is meant to find: the accuracy evaluation scores
  // the column on them (tests/support/accuracy_score.cpp).
  std::vector<std::string> catches = {};
};

struct MetricDescriptor {
  std::string name;      // the metric's name (its first column's name)
  std::string citation;  // the published method it follows, or "our own" and why
  std::vector<ColumnDescriptor> columns;
};

// Every registered metric's descriptor, in registry order (the column order
// of report.frames).
const std::vector<const MetricDescriptor*>& metric_descriptors();

// The column of that name in any registered metric, or null.
const ColumnDescriptor* find_column(const std::string& column);

// The metric that writes that column, or null.
const MetricDescriptor* find_metric_of_column(const std::string& column);

// Words for the enums (`clipwarden metrics`, docs, the README table).
const char* to_string(Better better);
const char* to_string(FrameRateDependence dependence);

}  // namespace clipwarden
