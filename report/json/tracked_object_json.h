// A tracked object (report.h's TrackedObject) <-> its entry in the report's
// "objects" array. The per-look values are written column-wise, one array
// per value aligned with "frames", as the report schema lays them out.
#pragma once

#include <string>

#include <nlohmann/json.hpp>

#include "clipwarden/report.h"

namespace clipwarden {

nlohmann::json tracked_object_to_json(const TrackedObject& object);

// Reads one entry; `path` prefixes key names in errors ("objects[3].").
// Keys added to the schema later (own_color_de00, boxes_frac, ...) may be
// absent in older reports and read as unknown. Throws json_fields::BadKey.
TrackedObject tracked_object_from_json(const nlohmann::json& entry, const std::string& path);

}  // namespace clipwarden
