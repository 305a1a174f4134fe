#include "analyzer/inject/defect_spec.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdlib>
#include <map>

namespace clipwarden::inject {
namespace {

struct ClassInfo {
  DefectClass cls;
  const char* name;
  const char* unit;
  std::array<double, 3> levels;  // weak, moderate, strong
  std::vector<std::string> keys;  // accepted keys besides `strength`
};

// Strength levels were set with the accuracy evaluation (docs/accuracy.md):
// weak is near what a viewer just notices, strong is plainly broken.
const std::vector<ClassInfo>& class_table() {
  static const std::vector<ClassInfo> table = {
      {DefectClass::flicker, "flicker", "relative luminance gain amplitude", {0.03, 0.08, 0.2}, {"hz", "wave"}},
      {DefectClass::local_flicker,
       "local_flicker",
       "relative luminance gain amplitude in the region",
       {0.1, 0.25, 0.5},
       {"hz", "wave", "region", "size", "track"}},
      {DefectClass::boiling, "boiling", "noise standard deviation, 8-bit code values", {4, 10, 24},
       {"region", "size", "track", "grain"}},
      {DefectClass::colour_drift, "colour_drift", "CIEDE2000 of the region's mean colour at the end", {5, 12, 25},
       {"region", "size", "track"}},
      {DefectClass::shape_drift, "shape_drift", "relative scale change at the end", {0.08, 0.2, 0.4},
       {"region", "size", "track"}},
      {DefectClass::vanish, "vanish", "share of the region replaced by its surroundings at the end", {0.5, 0.85, 1.0},
       {"region", "size", "track"}},
      {DefectClass::freeze, "freeze", "frames repeated", {1, 4, 12}, {}},
      {DefectClass::drop, "drop", "frames removed", {1, 2, 4}, {}},
      {DefectClass::cut, "cut", "seconds between the spliced frames and their source in the same clip", {1, 4, 10},
       {"source", "source_start"}},
      {DefectClass::jerk, "jerk", "displacement, fraction of the frame's long side", {0.01, 0.025, 0.06},
       {"direction"}},
      {DefectClass::strobe, "strobe", "relative luminance change of each flash", {0.12, 0.25, 0.5}, {"hz"}},
  };
  return table;
}

const ClassInfo& info_of(DefectClass c) { return class_table()[static_cast<size_t>(c)]; }

Error spec_error(const std::string& spec, const std::string& cause) {
  return usage_error("--defect '" + spec + "'", cause);
}

// Strict number parsing: the whole text must be a finite number.
std::optional<double> parse_number(const std::string& text) {
  if (text.empty()) return std::nullopt;
  char* end = nullptr;
  const double v = std::strtod(text.c_str(), &end);
  if (*end != '\0' || !std::isfinite(v)) return std::nullopt;
  return v;
}

// One end of a range: "30" (frame) or "2.5s" (seconds).
Expected<std::pair<double, bool>> parse_range_end(const std::string& spec, const std::string& text) {
  const bool seconds = !text.empty() && text.back() == 's';
  auto v = parse_number(seconds ? text.substr(0, text.size() - 1) : text);
  if (!v || *v < 0) return spec_error(spec, "range end '" + text + "' is not a frame number or a time like 2.5s");
  if (!seconds && *v != std::floor(*v)) return spec_error(spec, "frame '" + text + "' is not a whole number");
  return std::pair{*v, seconds};
}

Expected<SpecRange> parse_range(const std::string& spec, const std::string& text) {
  if (text.empty()) return spec_error(spec, "missing range after '@' (e.g. @30-59 or @2s-4s)");
  const auto dash = text.find('-');
  auto first = parse_range_end(spec, text.substr(0, dash));
  if (!first) return first.error();
  SpecRange range;
  range.in_seconds = first->second;
  range.start = first->first;
  if (dash == std::string::npos) {
    range.single_frame = true;
    if (!range.in_seconds) range.end = range.start;
    return range;
  }
  const std::string rest = text.substr(dash + 1);
  if (rest.empty()) return range;  // open end
  auto second = parse_range_end(spec, rest);
  if (!second) return second.error();
  if (second->second != range.in_seconds)
    return spec_error(spec, "range '" + text + "' mixes frames and seconds");
  if (range.in_seconds ? second->first <= range.start : second->first < range.start)
    return spec_error(spec, "range '" + text + "' ends before it starts");
  range.end = second->first;
  return range;
}

Expected<NormalizedRegion> parse_region(const std::string& spec, const std::string& text) {
  std::vector<double> parts;
  size_t pos = 0;
  while (pos <= text.size()) {
    const size_t slash = std::min(text.find('/', pos), text.size());
    auto v = parse_number(text.substr(pos, slash - pos));
    if (!v) break;
    parts.push_back(*v);
    pos = slash + 1;
  }
  if (parts.size() != 4 || pos != text.size() + 1)
    return spec_error(spec, "region '" + text + "' is not X/Y/W/H in fractions of the frame (e.g. 0.4/0.3/0.2/0.2)");
  NormalizedRegion r{parts[0], parts[1], parts[2], parts[3]};
  if (r.x < 0 || r.y < 0 || r.w <= 0 || r.h <= 0 || r.x + r.w > 1 + 1e-9 || r.y + r.h > 1 + 1e-9)
    return spec_error(spec, "region '" + text + "' must lie inside the frame (0 <= X, X+W <= 1, same for Y/H)");
  return r;
}

Expected<double> number_in(const std::string& spec, const std::string& key, const std::string& value, double min,
                           double max) {
  auto v = parse_number(value);
  if (!v || *v < min || *v > max)
    return spec_error(spec, key + "='" + value + "' expects a number from " + std::to_string(min).substr(0, 6) +
                                " to " + std::to_string(max).substr(0, 6));
  return *v;
}

Status apply_strength(DefectSpec& d, const std::string& value) {
  static const std::map<std::string, StrengthLevel> names = {
      {"weak", StrengthLevel::weak}, {"moderate", StrengthLevel::moderate}, {"strong", StrengthLevel::strong}};
  if (auto it = names.find(value); it != names.end()) {
    d.level = it->second;
    return Ok{};
  }
  if (strength_is_range_length(d.cls))
    return spec_error(d.text, "the strength of " + std::string(to_string(d.cls)) +
                                  " is the length of its range; strength takes only weak|moderate|strong");
  auto v = number_in(d.text, "strength", value, 1e-6, 1e6);
  if (!v) return v.error();
  d.strength = *v;
  return Ok{};
}

// One KEY=VALUE. The class's key list was checked by the caller.
Status apply_key(DefectSpec& d, const std::string& key, const std::string& value) {
  if (key == "strength") return apply_strength(d, value);
  if (key == "region") {
    auto r = parse_region(d.text, value);
    if (!r) return r.error();
    d.region = *r;
  } else if (key == "size") {
    auto v = number_in(d.text, key, value, 0.02, 1.0);
    if (!v) return v.error();
    d.region_size = *v;
  } else if (key == "track") {
    if (value != "flow" && value != "fixed") return spec_error(d.text, "track='" + value + "' expects flow or fixed");
    d.track = value == "flow";
  } else if (key == "hz") {
    auto v = number_in(d.text, key, value, 0.05, 1000);
    if (!v) return v.error();
    d.hz = *v;
  } else if (key == "wave") {
    if (value != "square" && value != "sine") return spec_error(d.text, "wave='" + value + "' expects square or sine");
    d.sine = value == "sine";
  } else if (key == "grain") {
    auto v = number_in(d.text, key, value, 0.5, 512);
    if (!v) return v.error();
    d.grain_px = *v;
  } else if (key == "direction") {
    auto v = number_in(d.text, key, value, -360, 360);
    if (!v) return v.error();
    d.direction_deg = *v;
  } else if (key == "source") {
    if (value.empty()) return spec_error(d.text, "source= needs a clip path");
    d.source_path = value;
  } else if (key == "source_start") {
    auto v = number_in(d.text, key, value, 0, 1e9);
    if (!v || *v != std::floor(*v)) return spec_error(d.text, "source_start='" + value + "' expects a frame number");
    d.source_start = static_cast<int64_t>(*v);
  }
  return Ok{};
}

Status parse_params(DefectSpec& d, const std::string& text) {
  const ClassInfo& info = info_of(d.cls);
  size_t pos = 0;
  while (pos <= text.size()) {
    // A comma starts the next KEY=VALUE only when a '=' follows before the
    // next comma, so values such as paths may hold commas of their own.
    size_t end = pos;
    for (;;) {
      end = text.find(',', end);
      if (end == std::string::npos) break;
      const size_t next_comma = text.find(',', end + 1);
      const size_t next_eq = text.find('=', end + 1);
      if (next_eq != std::string::npos && (next_comma == std::string::npos || next_eq < next_comma)) break;
      ++end;
    }
    if (end == std::string::npos) end = text.size();
    const std::string item = text.substr(pos, end - pos);
    const auto eq = item.find('=');
    if (eq == std::string::npos || eq == 0)
      return spec_error(d.text, "'" + item + "' is not KEY=VALUE");
    const std::string key = item.substr(0, eq);
    const bool known = key == "strength" || std::find(info.keys.begin(), info.keys.end(), key) != info.keys.end();
    if (!known) {
      std::string accepted = "strength";
      for (const auto& k : info.keys) accepted += ", " + k;
      return spec_error(d.text, "unknown key '" + key + "' for " + info.name + " (accepted: " + accepted + ")");
    }
    if (Status s = apply_key(d, key, item.substr(eq + 1)); !s) return s;
    pos = end + 1;
  }
  return Ok{};
}

}  // namespace

const char* to_string(DefectClass c) { return info_of(c).name; }

std::optional<DefectClass> defect_class_from_string(const std::string& name) {
  const std::string n = name == "color_drift" ? "colour_drift" : name;
  for (const auto& info : class_table())
    if (n == info.name) return info.cls;
  return std::nullopt;
}

std::vector<DefectClass> all_defect_classes() {
  std::vector<DefectClass> out;
  for (const auto& info : class_table()) out.push_back(info.cls);
  return out;
}

const char* to_string(StrengthLevel level) {
  switch (level) {
    case StrengthLevel::weak: return "weak";
    case StrengthLevel::moderate: return "moderate";
    case StrengthLevel::strong: return "strong";
  }
  return "moderate";
}

double strength_for_level(DefectClass c, StrengthLevel level) {
  return info_of(c).levels[static_cast<size_t>(level)];
}
const char* strength_unit(DefectClass c) { return info_of(c).unit; }
bool strength_is_range_length(DefectClass c) { return c == DefectClass::freeze || c == DefectClass::drop; }
bool has_region(DefectClass c) {
  return c == DefectClass::local_flicker || c == DefectClass::boiling || c == DefectClass::colour_drift ||
         c == DefectClass::shape_drift || c == DefectClass::vanish;
}

double DefectSpec::strength_value() const {
  if (strength) return *strength;
  return strength_for_level(cls, level.value_or(StrengthLevel::moderate));
}

Expected<DefectSpec> parse_defect_spec(const std::string& text) {
  DefectSpec d;
  d.text = text;
  const auto at = text.find('@');
  if (at == std::string::npos)
    return spec_error(text, "expected CLASS@RANGE[:KEY=VALUE,...], e.g. flicker@30-59:strength=0.1");
  const std::string name = text.substr(0, at);
  auto cls = defect_class_from_string(name);
  if (!cls) {
    std::string known;
    for (const auto& info : class_table()) known += (known.empty() ? "" : ", ") + std::string(info.name);
    return spec_error(text, "unknown defect class '" + name + "' (known: " + known + ")");
  }
  d.cls = *cls;
  const auto colon = text.find(':', at);
  auto range = parse_range(text, text.substr(at + 1, colon == std::string::npos ? std::string::npos : colon - at - 1));
  if (!range) return range.error();
  d.range = *range;
  if (colon != std::string::npos) {
    if (colon + 1 == text.size()) return spec_error(text, "nothing after ':'");
    if (Status s = parse_params(d, text.substr(colon + 1)); !s) return s.error();
  }
  if ((d.cls == DefectClass::freeze) && !d.range.in_seconds && d.range.start < 1)
    return spec_error(text, "freeze needs a frame before its range to repeat (start at frame 1 or later)");
  return d;
}

double default_pulse_hz(DefectClass c) { return c == DefectClass::strobe ? 6.0 : 4.0; }

}  // namespace clipwarden::inject
