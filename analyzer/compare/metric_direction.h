// Which way is better for each statistic a report holds: a column's
// direction comes from its metric's descriptor (Better, metric_descriptor.h);
// the coherence score is higher-is-better. Columns that describe the content
// rather than its quality have no better direction; they are not compared.
#pragma once

#include <string>

namespace clipwarden::compare_detail {

enum class Direction { lower_is_better, higher_is_better, descriptive };

Direction direction_of(const std::string& metric);

}  // namespace clipwarden::compare_detail
