// Deriving the natural levels (analyzer/metrics/natural_levels.h) from
// clean camera footage: per bin of motion per frame, the 99th percentile of
// each measure over the clips' frame pairs. Each clip weighs at most
// kPairsPerClip pairs in total (a long clip does not outvote short ones),
// levels never fall as motion grows (more motion never makes a warp easier),
// and a bin with too few pairs takes its neighbour's level.
#pragma once

#include <span>
#include <string>
#include <vector>

#include "analyzer/metrics/natural_levels.h"
#include "clipwarden/report.h"

namespace clipwarden::calibration {

inline constexpr double kPairsPerClip = 60;
inline constexpr double kMinBinWeight = 20;
inline constexpr double kNaturalQuantile = 0.99;

// The bins of the kept table, with levels derived from `camera` reports.
std::vector<NaturalBin> derive_natural_levels(const std::vector<const Report*>& camera);

// The table as rows of natural_levels.cpp and as a markdown table.
std::string natural_levels_cpp(const std::vector<NaturalBin>& bins);
std::string natural_levels_markdown(const std::vector<NaturalBin>& bins);

// The largest relative difference between two tables' levels (same bins).
double largest_relative_difference(const std::vector<NaturalBin>& a, std::span<const NaturalBin> b);

}  // namespace clipwarden::calibration
