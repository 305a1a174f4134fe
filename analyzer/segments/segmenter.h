// Per-frame series -> incoherent segments, by the rule in the policy
// (clipwarden/policy.h, SegmentRule): hysteresis, robust clip baseline,
// minimum length, gap merging, severity from the peak.
#pragma once

#include <span>
#include <string>
#include <vector>

#include "clipwarden/policy.h"
#include "clipwarden/report.h"

namespace clipwarden {

// The enter/leave levels actually used for a series: the policy's, raised to
// the clip's own baseline median + k * 1.4826 * MAD when that is higher
// (1.4826 makes the MAD a consistent estimate of a normal sigma).
struct SegmentLevels {
  double enter = 0;
  double leave = 0;
};
SegmentLevels segment_levels(std::span<const double> values, const SegmentRule& rule);

std::vector<Segment> find_segments(const std::string& metric, std::span<const double> values,
                                   std::span<const double> times_s, const SegmentRule& rule);

// Segments of every series that has a rule in the policy, sorted by start.
std::vector<Segment> segment_report(const Report& report, const Policy& policy);

}  // namespace clipwarden
