// The paired dot plot of one compared statistic: each key's A value on the
// left axis joined to its B value on the right, the joining line coloured by
// whether B got better or worse in the metric's own direction. Inline SVG.
#pragma once

#include <string>
#include <vector>

#include "clipwarden/compare.h"

namespace clipwarden::html_detail {

std::string paired_dot_plot(const Comparison& comparison, size_t column);

// One prompt's change on a statistic; `worse` is B - A turned so that a
// positive value means B is worse in the statistic's direction.
struct PromptChange {
  const PairedKey* pair;
  double a, b, worse;
};
// The prompts with both values, worst in B first.
std::vector<PromptChange> prompt_changes(const Comparison& comparison, size_t column);

// Each prompt's difference as a bar, sorted worst in B first, with the
// seed-to-seed noise as a band around zero and the worst prompts named.
std::string prompt_difference_chart(const Comparison& comparison, size_t column);

// Short numbers for pages and plots: 4 significant digits, "–" when undefined.
std::string format_number(double v);

}  // namespace clipwarden::html_detail
