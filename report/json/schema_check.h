// A JSON Schema (draft-07) checker for the subset our schemas use: type,
// enum, required, properties, additionalProperties, items, minimum,
// maximum. Errors name the JSON path of the first violation.
#pragma once

#include <string>

#include <nlohmann/json.hpp>

#include "clipwarden/error.h"

namespace clipwarden {

Status check_against_schema(const nlohmann::json& document, const nlohmann::json& schema,
                            const std::string& subject);

}  // namespace clipwarden
