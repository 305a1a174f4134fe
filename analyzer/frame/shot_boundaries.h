// Shot boundaries: frames where a hard cut starts a new shot. Measures that
// compare a frame with the one before it (warp error, flicker, long-range
// warp error) mean nothing across a cut, which `cut` already reports; they
// are left undefined there, and running statistics restart at each shot.
#pragma once

#include <vector>

#include "clipwarden/report.h"

namespace clipwarden {

// The cut score at which a frame starts a new shot. Also the default
// policy's cut threshold (cut's descriptor, analyzer/metrics/cut_metric.cpp,
// where the measurement behind the number is given).
inline constexpr double kShotBoundaryCut = 0.4;

// true at frame t when frame t starts a new shot (t >= 1). Empty when the
// report has no cut series.
std::vector<bool> shot_boundaries(const Report& report);

// Sets `series` undefined at each boundary frame and the `span_after - 1`
// frames that follow it (for measures that look back several frames).
void clear_across_boundaries(std::vector<double>& series, const std::vector<bool>& boundaries, int span_after = 1);

}  // namespace clipwarden
