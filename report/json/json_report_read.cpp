// Reading a report back from JSON (gate resume, merge, compare). Every
// lookup is checked; an error names the key path that is missing or wrong.
#include <cmath>
#include <fstream>
#include <limits>
#include <sstream>

#include "analyzer/core/byte_text.h"
#include "analyzer/core/json_text.h"
#include "report/json/json_fields.h"
#include "report/json/tracked_object_json.h"
#include "clipwarden/report_io.h"

namespace clipwarden {
namespace {

using nlohmann::json;
using namespace json_fields;

ClipInfo read_clip(const json& c) {
  const std::string p = "clip.";
  ClipInfo out;
  str(c, "path", p);  // present and a string
  const auto path = get_bytes_field(c, "path");
  if (!path) throw BadKey{p + "path", "is flagged as escaped but is not a well-formed escape"};
  out.path = *path;
  out.sha256 = str(c, "sha256", p);
  out.container = str(c, "container", p);
  out.codec = str(c, "codec", p);
  out.width = whole_int(c, "width", p);
  out.height = whole_int(c, "height", p);
  out.fps = num(c, "fps", p);
  out.frame_count = whole_int64(c, "frame_count", p);
  out.duration_s = num(c, "duration_s", p);
  out.pix_fmt = str(c, "pix_fmt", p);
  if (c.contains("bit_depth")) out.bit_depth = whole_int(c, "bit_depth", p);
  out.rotation = whole_int(c, "rotation", p);
  const json& a = at(c, "audio", p);
  out.audio.present = boolean(a, "present", p + "audio.");
  if (a.contains("codec") && a["codec"].is_string()) out.audio.codec = a["codec"];
  out.audio.duration_s = opt_num(a, "duration_s", p + "audio.");
  out.audio.silent_from_s = opt_num(a, "silent_from_s", p + "audio.");
  return out;
}

void read_frames(const json& frames, Report& r) {
  const size_t n = frames.size();
  r.frame_times_s.resize(n);
  for (size_t i = 0; i < n; ++i) {
    const std::string p = "frames[" + std::to_string(i) + "].";
    const json& f = frames[i];
    r.frame_times_s[i] = num(f, "t", p);
    for (const auto& [key, value] : f.items()) {
      if (key == "index" || key == "t") continue;
      MetricSeries* s = r.find_series(key);
      if (!s) {
        r.series.push_back({key, std::vector<double>(n, kUndefined)});
        s = &r.series.back();
      }
      if (!value.is_null() && !value.is_number()) throw BadKey{p + key, "is not a number or null"};
      s->values[i] = value.is_null() ? kUndefined : value.get<double>();
    }
  }
}

void read_summary(const json& s, Report& r) {
  const std::string p = "summary.";
  r.summary.coherence = num(s, "coherence", p);
  const json& st = at(s, "stream", p);
  const std::string sp = p + "stream.";
  r.summary.stream.video_duration_s = num(st, "video_duration_s", sp);
  r.summary.stream.audio_duration_s = opt_num(st, "audio_duration_s", sp);
  r.summary.stream.mismatch_s = opt_num(st, "mismatch_s", sp);
  r.summary.stream.vfr = boolean(st, "vfr", sp);
  r.summary.stream.dropped_frames = whole_int(st, "dropped_frames", sp);
  r.summary.stream.duplicate_timestamps = whole_int(st, "duplicate_timestamps", sp);
  // Absent from reports written before the decoder's complaints were kept.
  for (auto [key, field] : {std::pair{"decode_errors", &StreamFacts::decode_errors},
                            std::pair{"concealed_frames", &StreamFacts::concealed_frames},
                            std::pair{"lost_frames", &StreamFacts::lost_frames}})
    if (st.contains(key)) r.summary.stream.*field = whole_int(st, key, sp);
  for (const auto& [name, entry] : s.items()) {
    if (name == "coherence" || name == "stream") continue;
    if (!entry.is_object()) throw BadKey{p + name, "is not an object"};
    if (entry.contains("details")) r.summary.details[name] = entry["details"];
    if (!entry.contains("p95")) continue;
    const std::string mp = p + name + ".";
    r.summary.metrics.push_back({name, num(entry, "mean", mp), num(entry, "p50", mp),
                                 num(entry, "p95", mp), num(entry, "max", mp)});
  }
}

Report read_report(const json& j) {
  Report r;
  if (str(j, "schema", "") != kReportSchema) throw BadKey{"schema", "is not " + std::string(kReportSchema)};
  r.tool_name = str(at(j, "tool", ""), "name", "tool.");
  r.tool_version = str(at(j, "tool", ""), "version", "tool.");
  r.clip = read_clip(at(j, "clip", ""));
  r.settings = at(j, "settings", "");
  read_frames(array(j, "frames", ""), r);
  const json& segments = array(j, "segments", "");
  for (size_t i = 0; i < segments.size(); ++i) {
    const std::string p = "segments[" + std::to_string(i) + "].";
    const json& s = segments[i];
    Segment seg;
    seg.metric = str(s, "metric", p);
    seg.start_frame = whole_int64(s, "start_frame", p);
    seg.end_frame = whole_int64(s, "end_frame", p);
    seg.start_s = num(s, "start_s", p);
    seg.end_s = num(s, "end_s", p);
    seg.peak = num(s, "peak", p);
    seg.peak_frame = s.contains("peak_frame") ? whole_int64(s, "peak_frame", p) : seg.start_frame;
    auto sev = severity_from_string(str(s, "severity", p));
    if (!sev) throw BadKey{p + "severity", "is not info, review or reject"};
    seg.severity = *sev;
    r.segments.push_back(std::move(seg));
  }
  read_summary(at(j, "summary", ""), r);
  if (j.contains("objects")) {
    const json& objects = array(j, "objects", "");
    for (size_t i = 0; i < objects.size(); ++i)
      r.objects.push_back(tracked_object_from_json(objects[i], "objects[" + std::to_string(i) + "]."));
  }
  const json& verdict = at(j, "verdict", "");
  const std::string status = str(verdict, "status", "verdict.");
  if (status == "pass") r.verdict.status = Verdict::pass;
  else if (status == "review") r.verdict.status = Verdict::review;
  else if (status == "reject") r.verdict.status = Verdict::reject;
  else throw BadKey{"verdict.status", "is not pass, review or reject"};
  for (const auto& reason : array(verdict, "reasons", "verdict."))
    if (reason.is_string()) r.verdict.reasons.push_back(reason);
  if (j.contains("notes") && j["notes"].is_array())
    for (const auto& n : j["notes"])
      if (n.is_string()) r.notes.push_back(n);
  return r;
}

}  // namespace

Expected<Report> report_from_json(const json& j, const std::string& subject) {
  try {
    return read_report(j);
  } catch (const json_fields::BadKey& bad) {
    return input_error(subject, "report key '" + bad.path + "' " + bad.cause);
  } catch (const json::exception& e) {
    return input_error(subject, std::string("malformed report: ") + e.what());
  }
}

Expected<Report> read_report_file(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) return input_error(path, "cannot open report");
  std::stringstream buffer;
  buffer << in.rdbuf();
  auto j = parse_json_text(buffer.str(), path, ErrorKind::input);
  if (!j) return j.error();
  return report_from_json(*j, path);
}

}  // namespace clipwarden
