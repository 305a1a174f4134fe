// Checked lookups for the report readers: each names the key path that is
// missing or of the wrong type, so a bad report is refused with a message
// that says where (report_from_json turns BadKey into an Error). And the
// writers' one rule for unknown values: NaN is written as null.
#pragma once

#include <cmath>
#include <cstdint>
#include <limits>
#include <optional>
#include <string>

#include <nlohmann/json.hpp>

#include "clipwarden/report.h"

namespace clipwarden::json_fields {

using nlohmann::json;

inline json number_or_null(double v) { return std::isfinite(v) ? json(v) : json(nullptr); }

// Thrown by the readers and turned into an Error at report_from_json.
struct BadKey {
  std::string path;
  std::string cause;
};

inline const json& at(const json& j, const std::string& key, const std::string& path) {
  if (!j.is_object() || !j.contains(key)) throw BadKey{path + key, "is missing"};
  return j[key];
}
// A number or null (unknown) at `where`.
inline double number_value(const json& v, const std::string& where) {
  if (v.is_null()) return kUndefined;
  if (!v.is_number()) throw BadKey{where, "is not a number"};
  return v.get<double>();
}
inline double num(const json& j, const std::string& key, const std::string& path) {
  return number_value(at(j, key, path), path + key);
}
inline std::optional<double> opt_num(const json& j, const std::string& key, const std::string& path) {
  if (!j.contains(key) || j[key].is_null()) return std::nullopt;
  return num(j, key, path);
}
// Sizes, counts and frame indices. Casting a fractional, null, infinite or
// out-of-range number to an integer type is undefined behaviour (C++
// [conv.fpint]), so such values are refused by name (found by fuzzing).
template <class Int>
Int whole_value(const json& j, const std::string& where) {
  const double v = number_value(j, where);
  // Signed ranges are [-2^k, 2^k): both ends are exact in a double.
  const double low = static_cast<double>(std::numeric_limits<Int>::min());
  if (!(std::trunc(v) == v && v >= low && v < -low))
    throw BadKey{where, "is not a whole number in range"};
  return static_cast<Int>(v);
}
template <class Int>
Int whole(const json& j, const std::string& key, const std::string& path) {
  return whole_value<Int>(at(j, key, path), path + key);
}
inline int whole_int(const json& j, const std::string& key, const std::string& path) {
  return whole<int>(j, key, path);
}
inline int64_t whole_int64(const json& j, const std::string& key, const std::string& path) {
  return whole<int64_t>(j, key, path);
}
inline std::string str(const json& j, const std::string& key, const std::string& path) {
  const json& v = at(j, key, path);
  if (!v.is_string()) throw BadKey{path + key, "is not a string"};
  return v.get<std::string>();
}
inline bool boolean(const json& j, const std::string& key, const std::string& path) {
  const json& v = at(j, key, path);
  if (!v.is_boolean()) throw BadKey{path + key, "is not true or false"};
  return v.get<bool>();
}
inline const json& array(const json& j, const std::string& key, const std::string& path) {
  const json& v = at(j, key, path);
  if (!v.is_array()) throw BadKey{path + key, "is not an array"};
  return v;
}

}  // namespace clipwarden::json_fields
