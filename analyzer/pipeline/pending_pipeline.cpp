// Temporary until the pipeline lands.
#include "framelint/analysis.h"

namespace framelint {
Expected<Report> analyze_clip(const std::string& path, const AnalysisSettings&, const Policy&,
                              const AnalysisHooks&) {
  return input_error(path, "pipeline not built yet");
}
const char* to_string(Preset p) { return p == Preset::fast ? "fast" : p == Preset::balanced ? "balanced" : "thorough"; }
std::optional<Preset> preset_from_string(const std::string& s) {
  if (s == "fast") return Preset::fast;
  if (s == "balanced") return Preset::balanced;
  if (s == "thorough") return Preset::thorough;
  return std::nullopt;
}
}  // namespace framelint
