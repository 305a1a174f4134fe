// Clip-level numbers: per-metric statistics and the 0-100 coherence score.
#pragma once

#include <vector>

#include "clipwarden/report.h"

namespace clipwarden {

// mean, p50, p95 (linear interpolation) and max of each series' defined values.
std::vector<MetricSummary> summarise_series(const std::vector<MetricSeries>& series);

// Coherence: the share of the clip free of incoherence, in percent.
// Each frame weighs w = 1 inside a reject segment, 0.5 inside a review
// segment, 0.1 inside an info segment, 0 elsewhere (the largest applies);
//   coherence = 100 * (1 - mean_over_frames(w)).
double coherence_score(const std::vector<Segment>& segments, int64_t frame_count);

}  // namespace clipwarden
