#include "analyzer/segments/segmenter.h"

#include <algorithm>
#include <cmath>

#include "analyzer/frame/series_math.h"

namespace clipwarden {

SegmentLevels segment_levels(std::span<const double> values, const SegmentRule& rule) {
  SegmentLevels levels{rule.enter, rule.leave};
  if (rule.baseline_k <= 0) return levels;
  const std::vector<double> defined = defined_values(values);
  if (defined.size() < 8) return levels;  // too short for a baseline
  double baseline = quantile(defined, 0.5) + rule.baseline_k * 1.4826 * median_absolute_deviation(defined);
  // A clip may excuse its own busy level, but never beyond the reject level:
  // a clip that is past reject all the time is incoherent all the time.
  if (rule.reject_peak > 0) baseline = std::min(baseline, rule.reject_peak);
  if (baseline > levels.enter) {
    // Keep the policy's leave/enter ratio so hysteresis scales with it.
    const double ratio = rule.enter > 0 ? rule.leave / rule.enter : 1.0;
    levels.enter = baseline;
    levels.leave = baseline * ratio;
  }
  return levels;
}

namespace {

Severity severity_of(double peak, const SegmentRule& rule) {
  if (rule.reject_peak > 0 && peak >= rule.reject_peak) return Severity::reject;
  if (rule.review_peak > 0 && peak >= rule.review_peak) return Severity::review;
  return Severity::info;
}

void set_peak(Segment& s, std::span<const double> values) {
  s.peak = -INFINITY;
  for (int64_t i = s.start_frame; i <= s.end_frame; ++i)
    if (!std::isnan(values[i]) && values[i] > s.peak) {
      s.peak = values[i];
      s.peak_frame = i;
    }
}

}  // namespace

std::vector<Segment> find_segments(const std::string& metric, std::span<const double> values,
                                   std::span<const double> times_s, const SegmentRule& rule) {
  const SegmentLevels levels = segment_levels(values, rule);
  std::vector<Segment> raw;
  const int64_t n = static_cast<int64_t>(values.size());
  int64_t open = -1;
  for (int64_t i = 0; i <= n; ++i) {
    const double v = i < n ? values[i] : NAN;
    const bool defined = !std::isnan(v);
    if (open < 0) {
      if (defined && v >= levels.enter) open = i;
    } else if (!defined || v < levels.leave) {
      raw.push_back({metric, open, i - 1});
      open = -1;
    }
  }
  // Join segments separated by short gaps, then drop the short ones.
  std::vector<Segment> merged;
  for (auto& s : raw) {
    if (!merged.empty() && s.start_frame - merged.back().end_frame - 1 <= rule.merge_gap_frames)
      merged.back().end_frame = s.end_frame;
    else
      merged.push_back(s);
  }
  std::vector<Segment> out;
  for (auto& s : merged) {
    if (s.end_frame - s.start_frame + 1 < std::max(1, rule.min_frames)) continue;
    set_peak(s, values);
    s.start_s = times_s[s.start_frame];
    s.end_s = times_s[s.end_frame];
    s.severity = severity_of(s.peak, rule);
    out.push_back(s);
  }
  return out;
}

std::vector<Segment> segment_report(const Report& report, const Policy& policy) {
  std::vector<Segment> out;
  for (const auto& series : report.series) {
    auto rule = policy.segments.find(series.metric);
    if (rule == policy.segments.end()) continue;
    auto found = find_segments(series.metric, series.values, report.frame_times_s, rule->second);
    out.insert(out.end(), found.begin(), found.end());
  }
  std::stable_sort(out.begin(), out.end(), [](const Segment& a, const Segment& b) {
    return a.start_frame != b.start_frame ? a.start_frame < b.start_frame : a.metric < b.metric;
  });
  return out;
}

}  // namespace clipwarden
