// Temporary: entry points whose modules are being written. Each returns an
// error; this file is deleted as the modules land.
#include "framelint/analysis.h"
#include "framelint/clip_source.h"
#include "framelint/policy.h"

namespace framelint {
Expected<std::unique_ptr<ClipSource>> ClipSource::open(const std::string& path, const SourceOptions&) {
  return input_error(path, "decoder not built yet");
}
Expected<nlohmann::json> probe_clip(const std::string& path, const SourceOptions&) {
  return input_error(path, "decoder not built yet");
}
Expected<std::string> sha256_file(const std::string& path) { return input_error(path, "not built yet"); }
}  // namespace framelint
namespace framelint {
Expected<Report> analyze_clip(const std::string& path, const AnalysisSettings&, const Policy&,
                              const AnalysisHooks&) {
  return input_error(path, "pipeline not built yet");
}
const Policy& default_policy() {
  static Policy p;
  return p;
}
VerdictResult evaluate_policy(const Report&, const Policy&) { return {}; }
Expected<Policy> load_policy(const std::string& path) { return usage_error(path, "not built yet"); }
}  // namespace framelint
namespace framelint {
const char* to_string(Preset p) { return p == Preset::fast ? "fast" : p == Preset::balanced ? "balanced" : "thorough"; }
std::optional<Preset> preset_from_string(const std::string& s) {
  if (s == "fast") return Preset::fast;
  if (s == "balanced") return Preset::balanced;
  if (s == "thorough") return Preset::thorough;
  return std::nullopt;
}
}  // namespace framelint
