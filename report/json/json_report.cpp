// Report <-> JSON ("clipwarden.report/1"). The per-frame series are stored
// column-wise in memory and written row-wise: one object per frame.
#include <cmath>

#include "analyzer/core/byte_text.h"
#include "clipwarden/report_io.h"
#include "report/json/json_fields.h"
#include "report/json/tracked_object_json.h"
#include "clipwarden/version.h"

namespace clipwarden {
namespace {

using nlohmann::json;
using json_fields::number_or_null;

template <class T>
json optional_or_null(const std::optional<T>& v) {
  return v ? json(*v) : json(nullptr);
}

json clip_to_json(const ClipInfo& c) {
  json out = {{"sha256", c.sha256},
          {"container", c.container},
          {"codec", c.codec},
          {"width", c.width},
          {"height", c.height},
          {"fps", c.fps},
          {"frame_count", c.frame_count},
          {"duration_s", c.duration_s},
          {"pix_fmt", c.pix_fmt},
          {"bit_depth", c.bit_depth},
          {"rotation", c.rotation},
          {"audio",
           {{"present", c.audio.present},
            {"codec", c.audio.codec},
            {"duration_s", optional_or_null(c.audio.duration_s)},
            {"silent_from_s", optional_or_null(c.audio.silent_from_s)}}}};
  put_bytes_field(out, "path", c.path);  // a file name need not be UTF-8
  return out;
}

json stream_to_json(const StreamFacts& s) {
  return {{"video_duration_s", s.video_duration_s},
          {"audio_duration_s", optional_or_null(s.audio_duration_s)},
          {"mismatch_s", optional_or_null(s.mismatch_s)},
          {"vfr", s.vfr},
          {"dropped_frames", s.dropped_frames},
          {"duplicate_timestamps", s.duplicate_timestamps},
          {"decode_errors", s.decode_errors},
          {"concealed_frames", s.concealed_frames},
          {"lost_frames", s.lost_frames}};
}

json frames_to_json(const Report& r) {
  json frames = json::array();
  for (size_t i = 0; i < r.frame_times_s.size(); ++i) {
    json f = {{"index", i}, {"t", r.frame_times_s[i]}};
    for (const auto& s : r.series) f[s.metric] = number_or_null(i < s.values.size() ? s.values[i] : kUndefined);
    frames.push_back(std::move(f));
  }
  return frames;
}

json summary_to_json(const Summary& s) {
  json out = json::object();
  for (const auto& m : s.metrics) {
    json entry = {{"mean", number_or_null(m.mean)},
                  {"p50", number_or_null(m.p50)},
                  {"p95", number_or_null(m.p95)},
                  {"max", number_or_null(m.max)}};
    if (s.details.contains(m.metric)) entry["details"] = s.details[m.metric];
    out[m.metric] = std::move(entry);
  }
  for (const auto& [name, details] : s.details.items())
    if (!out.contains(name)) out[name] = {{"details", details}};
  out["coherence"] = s.coherence;
  out["stream"] = stream_to_json(s.stream);
  return out;
}

}  // namespace

json report_to_json(const Report& r) {
  json segments = json::array();
  for (const auto& s : r.segments)
    segments.push_back({{"metric", s.metric},
                        {"start_frame", s.start_frame},
                        {"end_frame", s.end_frame},
                        {"start_s", s.start_s},
                        {"end_s", s.end_s},
                        {"peak", s.peak},
                        {"peak_frame", s.peak_frame},
                        {"severity", to_string(s.severity)}});
  json objects = json::array();
  for (const auto& o : r.objects) objects.push_back(tracked_object_to_json(o));
  return {{"schema", kReportSchema},
          {"tool", {{"name", r.tool_name}, {"version", r.tool_version}}},
          {"clip", clip_to_json(r.clip)},
          {"settings", r.settings},
          {"frames", frames_to_json(r)},
          {"segments", std::move(segments)},
          {"summary", summary_to_json(r.summary)},
          {"objects", std::move(objects)},
          {"verdict", {{"status", to_string(r.verdict.status)}, {"reasons", r.verdict.reasons}}},
          {"notes", r.notes}};
}

}  // namespace clipwarden
