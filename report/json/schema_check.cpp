#include "report/json/schema_check.h"

#include <cmath>

#include "analyzer/core/assets.h"
#include "clipwarden/report_io.h"

namespace clipwarden {
namespace {

using nlohmann::json;

bool has_type(const json& value, const std::string& type) {
  if (type == "object") return value.is_object();
  if (type == "array") return value.is_array();
  if (type == "string") return value.is_string();
  if (type == "boolean") return value.is_boolean();
  if (type == "null") return value.is_null();
  if (type == "number") return value.is_number();
  if (type == "integer")
    // JSON Schema counts any number with a zero fractional part as an
    // integer (recalled from memory); testing that by a cast to int64_t was
    // undefined behaviour for huge values (found by fuzzing).
    return value.is_number_integer() ||
           (value.is_number_float() && std::trunc(value.get<double>()) == value.get<double>());
  return false;
}

// Returns an empty string when `value` satisfies `schema`, else what is wrong.
std::string violation(const json& value, const json& schema, const std::string& path) {
  if (schema.is_boolean()) return schema.get<bool>() ? "" : path + " is not allowed";
  if (!schema.is_object()) return "";
  if (schema.contains("type")) {
    const json& t = schema["type"];
    bool ok = false;
    if (t.is_string()) ok = has_type(value, t.get<std::string>());
    else for (const auto& each : t) ok = ok || has_type(value, each.get<std::string>());
    if (!ok) return path + " should be of type " + t.dump();
  }
  if (schema.contains("enum")) {
    bool found = false;
    for (const auto& e : schema["enum"]) found = found || e == value;
    if (!found) return path + " should be one of " + schema["enum"].dump();
  }
  if (value.is_number()) {
    if (schema.contains("minimum") && value.get<double>() < schema["minimum"].get<double>())
      return path + " is below the minimum " + schema["minimum"].dump();
    if (schema.contains("maximum") && value.get<double>() > schema["maximum"].get<double>())
      return path + " is above the maximum " + schema["maximum"].dump();
  }
  if (value.is_object()) {
    if (schema.contains("required"))
      for (const auto& key : schema["required"])
        if (!value.contains(key.get<std::string>())) return path + "." + key.get<std::string>() + " is missing";
    const json* properties = schema.contains("properties") ? &schema["properties"] : nullptr;
    for (const auto& [key, item] : value.items()) {
      const std::string item_path = path + "." + key;
      if (properties && properties->contains(key)) {
        if (auto v = violation(item, (*properties)[key], item_path); !v.empty()) return v;
      } else if (schema.contains("additionalProperties")) {
        if (auto v = violation(item, schema["additionalProperties"], item_path); !v.empty()) return v;
      }
    }
  }
  if (value.is_array() && schema.contains("items"))
    for (size_t i = 0; i < value.size(); ++i)
      if (auto v = violation(value[i], schema["items"], path + "[" + std::to_string(i) + "]"); !v.empty())
        return v;
  return "";
}

}  // namespace

Status check_against_schema(const json& document, const json& schema, const std::string& subject) {
  const std::string v = violation(document, schema, "$");
  if (v.empty()) return Ok{};
  return output_error(subject, "does not match its schema: " + v);
}

Status validate_report_json(const nlohmann::json& report, const std::string& subject) {
  static const json schema = json::parse(asset("clipwarden.report-1.schema.json"));
  return check_against_schema(report, schema, subject);
}

}  // namespace clipwarden
