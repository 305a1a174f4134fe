#include "report/json/tracked_object_json.h"

#include <array>
#include <cmath>

#include "report/json/json_fields.h"

namespace clipwarden {
namespace {

using nlohmann::json;
using namespace json_fields;


// The per-look values that are one number each, by their report key.
constexpr std::array<std::pair<const char*, double TrackedSample::*>, 7> kLookValues{{
    {"drift", &TrackedSample::drift},
    {"color_de00", &TrackedSample::color_de00},
    {"own_color_de00", &TrackedSample::own_color_de00},
    {"structure", &TrackedSample::structure},
    {"size_pct", &TrackedSample::size_pct},
    {"size_window_pct", &TrackedSample::size_window_pct},
    {"visible_pct", &TrackedSample::visible_pct},
}};

json box_row(int64_t frame, const BoxValues& b) {
  return {frame, number_or_null(b.x), number_or_null(b.y), number_or_null(b.width),
          number_or_null(b.height)};
}

// A box row [frame, x, y, width, height] for the look at `frame`.
BoxValues read_box_row(const json& row, int64_t frame, const std::string& where) {
  if (!row.is_array() || row.size() != 5) throw BadKey{where, "is not [frame, x, y, width, height]"};
  for (size_t k = 0; k < 5; ++k)
    if (!row[k].is_number() && !(k > 0 && row[k].is_null()))
      throw BadKey{where, "holds a value that is not a number"};
  if (row[0].get<double>() != static_cast<double>(frame))
    throw BadKey{where, "names a frame other than frames[] at the same place"};
  auto value = [&](size_t k) { return row[k].is_null() ? kUndefined : row[k].get<double>(); };
  return {value(1), value(2), value(3), value(4)};
}

// An array aligned with "frames" (absent in older reports: left unknown).
const json* aligned(const json& entry, const char* key, size_t looks, const std::string& path) {
  if (!entry.contains(key)) return nullptr;
  const json& v = array(entry, key, path);
  if (v.size() != looks) throw BadKey{path + key, "does not have one entry per frames[] entry"};
  return &v;
}

}  // namespace

json tracked_object_to_json(const TrackedObject& o) {
  json frames = json::array(), boxes = json::array(), boxes_frac = json::array(),
       segments = json::array();
  json values = json::object();
  for (const auto& [key, member] : kLookValues) values[key] = json::array();
  for (const auto& look : o.samples) {
    frames.push_back(look.frame);
    boxes.push_back(box_row(look.frame, look.box_px));
    boxes_frac.push_back(box_row(look.frame, look.box_frac));
    for (const auto& [key, member] : kLookValues) values[key].push_back(number_or_null(look.*member));
  }
  for (const auto& s : o.drift_segments)
    segments.push_back({{"start_frame", s.start_frame},
                        {"end_frame", s.end_frame},
                        {"start_s", number_or_null(s.start_s)},
                        {"end_s", number_or_null(s.end_s)},
                        {"peak", number_or_null(s.peak)},
                        {"peak_frame", s.peak_frame},
                        {"aspect", s.aspect}});
  json out = {{"id", o.id},
              {"first_frame", o.first_frame},
              {"last_frame", o.last_frame},
              {"vanished", o.vanished},
              {"end_reason", o.end_reason},
              {"kind", to_string(o.kind)},
              {"reference_frame", o.reference_frame},
              {"working_size", {o.working_width, o.working_height}},
              {"frames", std::move(frames)},
              {"boxes", std::move(boxes)},
              {"boxes_frac", std::move(boxes_frac)},
              {"peak_drift", number_or_null(o.peak_drift)},
              {"peak_frame", o.peak_frame ? json(*o.peak_frame) : json(nullptr)},
              {"drift_rate_per_s", number_or_null(o.drift_rate_per_s)},
              {"color_de00_rate_per_s", number_or_null(o.color_de00_rate_per_s)},
              {"drift_segments", std::move(segments)}};
  for (auto& [key, column] : values.items()) out[key] = std::move(column);
  return out;
}

TrackedObject tracked_object_from_json(const json& entry, const std::string& p) {
  if (!entry.is_object()) throw BadKey{p.substr(0, p.size() - 1), "is not an object"};
  TrackedObject o;
  o.id = whole_int(entry, "id", p);
  o.first_frame = whole_int64(entry, "first_frame", p);
  o.last_frame = whole_int64(entry, "last_frame", p);
  o.vanished = boolean(entry, "vanished", p);
  if (entry.contains("end_reason")) o.end_reason = str(entry, "end_reason", p);
  if (entry.contains("kind")) {
    const auto kind = tracked_kind_from_string(str(entry, "kind", p));
    if (!kind) throw BadKey{p + "kind", "is not moving or scene"};
    o.kind = *kind;
  }
  o.reference_frame = entry.contains("reference_frame") ? whole_int64(entry, "reference_frame", p)
                                                        : o.first_frame;
  if (entry.contains("working_size")) {
    const json& size = array(entry, "working_size", p);
    if (size.size() != 2) throw BadKey{p + "working_size", "is not [width, height]"};
    o.working_width = whole_value<int>(size[0], p + "working_size[0]");
    o.working_height = whole_value<int>(size[1], p + "working_size[1]");
  }
  static const json kNoFrames = json::array();
  const json& frames = entry.contains("frames") ? array(entry, "frames", p) : kNoFrames;
  const size_t n = frames.size();
  o.samples.resize(n);
  auto where = [&](const char* key, size_t i) { return p + key + "[" + std::to_string(i) + "]"; };
  for (size_t i = 0; i < n; ++i) o.samples[i].frame = whole_value<int64_t>(frames[i], where("frames", i));
  if (const json* rows = aligned(entry, "boxes", n, p))
    for (size_t i = 0; i < n; ++i)
      o.samples[i].box_px = read_box_row((*rows)[i], o.samples[i].frame, where("boxes", i));
  if (const json* rows = aligned(entry, "boxes_frac", n, p))
    for (size_t i = 0; i < n; ++i)
      o.samples[i].box_frac = read_box_row((*rows)[i], o.samples[i].frame, where("boxes_frac", i));
  for (const auto& [key, member] : kLookValues)
    if (const json* column = aligned(entry, key, n, p))
      for (size_t i = 0; i < n; ++i) o.samples[i].*member = number_value((*column)[i], where(key, i));
  o.peak_drift = entry.contains("peak_drift") ? num(entry, "peak_drift", p) : kUndefined;
  if (entry.contains("peak_frame") && !entry["peak_frame"].is_null())
    o.peak_frame = whole_int64(entry, "peak_frame", p);
  o.drift_rate_per_s = entry.contains("drift_rate_per_s") ? num(entry, "drift_rate_per_s", p) : kUndefined;
  o.color_de00_rate_per_s =
      entry.contains("color_de00_rate_per_s") ? num(entry, "color_de00_rate_per_s", p) : kUndefined;
  if (entry.contains("drift_segments")) {
    const json& segments = array(entry, "drift_segments", p);
    for (size_t i = 0; i < segments.size(); ++i) {
      const std::string sp = where("drift_segments", i) + ".";
      const json& s = segments[i];
      o.drift_segments.push_back({whole_int64(s, "start_frame", sp), whole_int64(s, "end_frame", sp),
                                  num(s, "start_s", sp), num(s, "end_s", sp), num(s, "peak", sp),
                                  whole_int64(s, "peak_frame", sp)});
      if (s.contains("aspect")) {
        std::string aspect = str(s, "aspect", sp);
        if (!aspect.empty() && aspect != "color" && aspect != "own_color" && aspect != "quarter_color" &&
            aspect != "structure" && aspect != "size")
          throw BadKey{sp + "aspect", "is not color, own_color, quarter_color, structure or size"};
        o.drift_segments.back().aspect = std::move(aspect);
      }
    }
  }
  return o;
}

}  // namespace clipwarden
