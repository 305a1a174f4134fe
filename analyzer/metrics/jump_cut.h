// jump_cut: a jump within one shot, read from the cut metric's series
// (analyzer/metrics/cut_metric.cpp, where the column is described).
#pragma once

#include <vector>

namespace clipwarden {

// Per pair: cut[i] over the second largest cut reading of the 5 pairs on
// either side (floored at 0.01), where 0.15 <= cut[i] < the cut level;
// 0 elsewhere, undefined where cut is.
std::vector<double> jump_cut_series(const std::vector<double>& cut);

}  // namespace clipwarden
