// What natural footage shows: per bin of motion per frame, the level that
// clean camera footage reaches at most in 1 pair of 100 (its 99th
// percentile) for the measures that depend on motion. A pair is judged by
// its value over the level for its own motion (natural_ratio), so a 10 fps
// clip, which moves 2.4x further per frame than the same scene at 24 fps, is
// compared with camera footage that moves as far, not with a fixed level.
//
// The table is data the accuracy evaluation derives from camera footage and
// the repository keeps (docs/accuracy.md, "Natural levels", has the command
// and the clips); natural_levels.cpp holds the numbers.
#pragma once

#include <span>

namespace clipwarden {

enum class NaturalMeasure { warp_error, warp_error_long, occluded_pct, warp_error_smooth };
inline constexpr int kNaturalMeasures = 4;

// One bin: pairs whose motion_px lies in [motion_from_px, motion_to_px).
struct NaturalBin {
  double motion_from_px;
  double motion_to_px;
  double level[kNaturalMeasures];  // 99th percentile of each measure on clean camera pairs, in enum order
  int pairs;                       // clean pairs the level was derived from
};

// The bins, in order of motion (the last one is open-ended).
std::span<const NaturalBin> natural_bins();

// The natural level of a measure at a motion (pixels per frame at the
// working size): piecewise linear in log(motion) between bin centres,
// constant beyond the first and last centre. NaN motion gives NaN.
double natural_level(NaturalMeasure measure, double motion_px);

// value / natural_level(measure, motion_px); NaN when either is undefined.
// 1 is what 1 clean camera pair in 100 reaches at that motion.
double natural_ratio(NaturalMeasure measure, double value, double motion_px);

}  // namespace clipwarden
