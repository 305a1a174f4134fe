// The paired dot plot of one compared statistic: each key's A value on the
// left axis joined to its B value on the right, the joining line coloured by
// whether B got better or worse in the metric's own direction. Inline SVG.
#pragma once

#include <string>

#include "clipwarden/compare.h"

namespace clipwarden::html_detail {

std::string paired_dot_plot(const Comparison& comparison, size_t column);

// Short numbers for pages and plots: 4 significant digits, "–" when undefined.
std::string format_number(double v);

}  // namespace clipwarden::html_detail
