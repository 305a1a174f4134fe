#include "analyzer/compare/metric_direction.h"

#include "analyzer/metrics/metric_descriptor.h"

namespace clipwarden::compare_detail {

Direction direction_of(const std::string& metric) {
  // coherence: the report's 0-100 score, 100 = no incoherence found; it is
  // the report's own score, not a metric's column.
  if (metric == "coherence") return Direction::higher_is_better;
  if (const ColumnDescriptor* column = find_column(metric)) {
    switch (column->better) {
      case Better::lower:
        return Direction::lower_is_better;
      case Better::higher:
        return Direction::higher_is_better;
      case Better::none:
        return Direction::descriptive;
    }
  }
  // A column this build does not know (a report from another version):
  // every metric so far measures a defect, so more is worse.
  return Direction::lower_is_better;
}

}  // namespace clipwarden::compare_detail
