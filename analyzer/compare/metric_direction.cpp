#include "analyzer/compare/metric_direction.h"

namespace clipwarden::compare_detail {

Direction direction_of(const std::string& metric) {
  // coherence: the report's 0-100 score, 100 = no incoherence found.
  if (metric == "coherence") return Direction::higher_is_better;
  // luminance: the frame's mean brightness, which flicker is derived from;
  // occluded_pct: the share of pixels the flow check marks occluded, which
  // follows the amount of motion in the scene. Neither is a defect.
  if (metric == "luminance" || metric == "occluded_pct") return Direction::descriptive;
  // warp_error, warp_error_long, flicker, drift, cut, freeze, jerk, flash and
  // any later defect measure: more is worse.
  return Direction::lower_is_better;
}

}  // namespace clipwarden::compare_detail
