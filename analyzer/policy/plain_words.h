// What a reviewer would see, in plain words, behind a verdict reason: "the
// picture stands still for 1.3 s", "a region at the lower left brightens
// and darkens 4 times in 1.2 s". Each reason keeps its metric, value, level
// and frames first, for tools and for people who know the metrics; these
// words follow, for people who do not.
#pragma once

#include <cstdint>
#include <string>

#include "clipwarden/report.h"

namespace clipwarden {

// Words for `metric` seen over frames first..last (inclusive) of the report;
// `count` is how many stretches the reason covers. Empty for a metric with
// no wording.
std::string plain_words(const Report& report, const std::string& metric, int64_t first,
                        int64_t last, int count);

// "the lower left", "the centre", ... for a cell of a cols x rows grid.
std::string grid_place(int row, int col, int rows, int cols);

}  // namespace clipwarden
