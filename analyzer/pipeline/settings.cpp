// Analysis settings: names of presets and the settings record of a report.
#include "clipwarden/analysis.h"
#include "clipwarden/version.h"

namespace clipwarden {

const char* to_string(Preset p) {
  switch (p) {
    case Preset::fast: return "fast";
    case Preset::balanced: return "balanced";
    case Preset::thorough: return "thorough";
  }
  return "balanced";
}

std::optional<Preset> preset_from_string(const std::string& s) {
  if (s == "fast") return Preset::fast;
  if (s == "balanced") return Preset::balanced;
  if (s == "thorough") return Preset::thorough;
  return std::nullopt;
}

nlohmann::json settings_to_json(const AnalysisSettings& s) {
  // Thread count is left out on purpose: results do not depend on it, and
  // the store's settings hash must not either.
  nlohmann::json j = {{"preset", to_string(s.preset)},
                      {"working_long_side_px", s.working_long_side},
                      {"long_range_k", s.long_range_k},
                      {"max_objects", s.max_objects},
                      {"flow", "opencv-dis"}};
  j["folder_fps"] = s.folder_fps ? nlohmann::json(*s.folder_fps) : nlohmann::json(nullptr);
  return j;
}

}  // namespace clipwarden
