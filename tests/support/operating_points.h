// Operating points of the accuracy evaluation: per defect class, the rules
// of the metrics that catch it scaled by a factor, and for each factor the
// recall and precision on injected defects (per kind of base) beside what
// the same rules do on clean camera footage (segments above info per
// minute, clips with one). A detector is judged by where it stands on this
// curve, not by one number: the false-alarm budget fixes the factor.
#pragma once

#include <string>
#include <vector>

#include "support/accuracy_score.h"

namespace clipwarden::accuracy {

// Clean camera footage for the false-alarm side: untouched reports and
// their length in minutes.
struct CleanFootage {
  const Report* report = nullptr;
  double minutes = 0;
};

// The factors each class's rule levels are scaled by (1 = the default policy).
const std::vector<double>& operating_factors();

// Markdown: one row per class and factor at `level`, a column per kind of base.
std::string operating_points_markdown(const std::vector<AnalyzedCase>& cases,
                                      const std::vector<AnalyzedClean>& clean_bases,
                                      const std::vector<CleanFootage>& camera, const Policy& policy,
                                      inject::StrengthLevel level);

}  // namespace clipwarden::accuracy
