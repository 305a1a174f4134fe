// Reports built in memory for the gate's tests (policy evaluation, queue,
// store). Invented values: only our own rules are under test.
#pragma once

#include <string>
#include <vector>

#include "clipwarden/report.h"

namespace clipwarden::fixtures {

// A calm clip: `frames` frames at `fps`, no series, coherence 100.
Report gate_report(int frames, double fps, const std::string& path = "clips/calm.mp4");

// Adds a per-frame series filled with `base`, with `value` on frames
// first..last, and recomputes the summary statistics of every series.
void add_series(Report& r, const std::string& metric, double base, double value = 0, int first = -1,
                int last = -1);

// Adds a segment of `metric` over first..last (times from the report).
void add_segment(Report& r, const std::string& metric, int first, int last, double peak,
                 Severity severity);

}  // namespace clipwarden::fixtures
