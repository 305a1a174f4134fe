// Running the accuracy evaluation end to end: prepare the base clips,
// inject every planned case, analyse the injected and the clean clips, and
// keep the reports for scoring (support/accuracy_score.h).
#pragma once

#include <functional>
#include <string>
#include <vector>

#include "clipwarden/analysis.h"
#include "support/accuracy_score.h"
#include "support/accuracy_set.h"

namespace clipwarden::accuracy {

struct EvalOptions {
  SetOptions set;  // work folder, size, frames, base clips
  std::vector<inject::DefectClass> classes = inject::all_defect_classes();
  std::vector<inject::StrengthLevel> levels = {inject::StrengthLevel::moderate};
  int placements = 1;
  uint64_t seed = 1;
  AnalysisSettings analysis;  // working_long_side is set to set.long_side
  Policy policy = default_policy();
  // When set, every analysed report is also written there as <id>.json
  // (slashes in the id become '_'), for looking at a case by hand.
  std::string reports_dir;
};

struct EvalRun {
  std::vector<BaseClip> bases;
  std::vector<AnalyzedCase> cases;
  std::vector<AnalyzedClean> clean;
  double seconds = 0;  // wall time of the run
};

Expected<EvalRun> run_evaluation(const EvalOptions& options);

}  // namespace clipwarden::accuracy
