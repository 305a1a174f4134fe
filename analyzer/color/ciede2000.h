// The CIEDE2000 colour difference (CIE 142-2001), implemented after
// G. Sharma, W. Wu, E. N. Dalal, "The CIEDE2000 color-difference formula:
// implementation notes, supplementary test data, and mathematical
// observations", Color Res. Appl. 30(1):21-30, 2005 (equations 1-22,
// including the hue rules at the +-180 degree discontinuity).
#pragma once

#include "analyzer/color/color_space.h"

namespace clipwarden::color {

// Parametric weights kL, kC, kH (1, 1, 1 for the reference conditions).
struct De2000Weights {
  double k_l = 1, k_c = 1, k_h = 1;
};

// Symmetric in its arguments; >= 0.
double ciede2000(const Lab& reference, const Lab& sample, const De2000Weights& weights = {});

}  // namespace clipwarden::color
