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

AnalysisSettings settings_from_json(const nlohmann::json& j) {
  AnalysisSettings s;
  if (!j.is_object()) return s;
  if (auto it = j.find("preset"); it != j.end() && it->is_string())
    s.preset = preset_from_string(it->get<std::string>()).value_or(s.preset);
  if (auto it = j.find("working_long_side_px"); it != j.end() && it->is_number_integer())
    s.working_long_side = it->get<int>();
  if (auto it = j.find("folder_fps"); it != j.end() && it->is_number()) s.folder_fps = it->get<double>();
  if (auto it = j.find("long_range_k"); it != j.end() && it->is_number_integer()) s.long_range_k = it->get<int>();
  if (auto it = j.find("max_objects"); it != j.end() && it->is_number_integer()) s.max_objects = it->get<int>();
  return s;
}

}  // namespace clipwarden
