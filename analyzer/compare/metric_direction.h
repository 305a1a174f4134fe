// Which way is better for each statistic a report holds. The per-frame
// metrics measure defects, so lower is better; the coherence score is the
// exception. Some report columns describe the content rather than its
// quality and have no better direction; they are not compared.
#pragma once

#include <string>

namespace clipwarden::compare_detail {

enum class Direction { lower_is_better, higher_is_better, descriptive };

Direction direction_of(const std::string& metric);

}  // namespace clipwarden::compare_detail
