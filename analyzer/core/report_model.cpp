// Small helpers of the report model (include/clipwarden/report.h).
#include "clipwarden/report.h"

namespace clipwarden {

const char* to_string(Severity s) {
  switch (s) {
    case Severity::info: return "info";
    case Severity::review: return "review";
    case Severity::reject: return "reject";
  }
  return "info";
}

std::optional<Severity> severity_from_string(const std::string& s) {
  if (s == "info") return Severity::info;
  if (s == "review") return Severity::review;
  if (s == "reject") return Severity::reject;
  return std::nullopt;
}

const char* to_string(TrackedKind kind) { return kind == TrackedKind::moving ? "moving" : "scene"; }

std::optional<TrackedKind> tracked_kind_from_string(const std::string& s) {
  if (s == "moving") return TrackedKind::moving;
  if (s == "scene") return TrackedKind::scene;
  return std::nullopt;
}

const char* to_string(Verdict v) {
  switch (v) {
    case Verdict::pass: return "pass";
    case Verdict::review: return "review";
    case Verdict::reject: return "reject";
  }
  return "pass";
}

const MetricSeries* Report::find_series(const std::string& metric) const {
  for (const auto& s : series)
    if (s.metric == metric) return &s;
  return nullptr;
}

MetricSeries* Report::find_series(const std::string& metric) {
  for (auto& s : series)
    if (s.metric == metric) return &s;
  return nullptr;
}

const MetricSummary* Report::find_summary(const std::string& metric) const {
  for (const auto& s : summary.metrics)
    if (s.metric == metric) return &s;
  return nullptr;
}

}  // namespace clipwarden
