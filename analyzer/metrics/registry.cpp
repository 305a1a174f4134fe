// The table of metrics: one line per metric below. Each metric's file
// defines `<name>_descriptor()` (what it writes and means, its default rule;
// metric_descriptor.h) and `make_<name>_metric()` (a fresh instance). Order
// here is the column order in report.frames, and the order of finish()
// calls (a metric may read the series of those before it).
#include <algorithm>

#include "analyzer/metrics/metric.h"

// clang-format off
#define CLIPWARDEN_REGISTERED_METRICS(X) \
  X(warp_error)                          \
  X(warp_error_long)                     \
  X(flicker)                             \
  X(freeze)                              \
  X(cut)                                 \
  X(flash)                               \
  X(jerk)                                \
  X(flicker_local)                       \
  X(boiling)                             \
  X(drift)
// clang-format on

namespace clipwarden {

#define CLIPWARDEN_DECLARE_METRIC(name)        \
  const MetricDescriptor& name##_descriptor(); \
  std::unique_ptr<Metric> make_##name##_metric(const AnalysisSettings&);
CLIPWARDEN_REGISTERED_METRICS(CLIPWARDEN_DECLARE_METRIC)
#undef CLIPWARDEN_DECLARE_METRIC

namespace {

struct RegisteredMetric {
  const MetricDescriptor& (*descriptor)();
  std::unique_ptr<Metric> (*make)(const AnalysisSettings&);
};

#define CLIPWARDEN_LIST_METRIC(name) RegisteredMetric{name##_descriptor, make_##name##_metric},
const RegisteredMetric kMetricTable[] = {CLIPWARDEN_REGISTERED_METRICS(CLIPWARDEN_LIST_METRIC)};
#undef CLIPWARDEN_LIST_METRIC

}  // namespace

std::vector<std::unique_ptr<Metric>> make_metrics(const AnalysisSettings& settings) {
  std::vector<std::unique_ptr<Metric>> metrics;
  for (const auto& entry : kMetricTable) metrics.push_back(entry.make(settings));
  return metrics;
}

const std::vector<const MetricDescriptor*>& metric_descriptors() {
  static const std::vector<const MetricDescriptor*> all = [] {
    std::vector<const MetricDescriptor*> out;
    for (const auto& entry : kMetricTable) out.push_back(&entry.descriptor());
    return out;
  }();
  return all;
}

const MetricDescriptor* find_metric_of_column(const std::string& column) {
  for (const MetricDescriptor* m : metric_descriptors())
    if (std::any_of(m->columns.begin(), m->columns.end(),
                    [&](const ColumnDescriptor& c) { return c.name == column; }))
      return m;
  return nullptr;
}

const ColumnDescriptor* find_column(const std::string& column) {
  if (const MetricDescriptor* m = find_metric_of_column(column))
    for (const auto& c : m->columns)
      if (c.name == column) return &c;
  return nullptr;
}

const char* to_string(Better better) {
  switch (better) {
    case Better::lower:
      return "lower";
    case Better::higher:
      return "higher";
    case Better::none:
      return "none";
  }
  return "none";
}

const char* to_string(FrameRateDependence dependence) {
  switch (dependence) {
    case FrameRateDependence::none:
      return "none";
    case FrameRateDependence::per_frame_pair:
      return "per_frame_pair";
    case FrameRateDependence::per_k_frames:
      return "per_k_frames";
    case FrameRateDependence::per_second:
      return "per_second";
    case FrameRateDependence::fps_squared:
      return "fps_squared";
  }
  return "none";
}

}  // namespace clipwarden
