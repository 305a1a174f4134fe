// The per-clip report model: plain values, written to JSON by
// report/json_report.* (schema "clipwarden.report/1") and read back by the
// gate, the store and compare. Field names match the JSON keys.
#pragma once

#include <cmath>
#include <cstdint>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

namespace clipwarden {

inline constexpr const char* kReportSchema = "clipwarden.report/1";

// NaN marks a per-frame value that is undefined (e.g. warp error of frame 0);
// it is written as JSON null.
inline constexpr double kUndefined = std::numeric_limits<double>::quiet_NaN();
inline bool is_defined(double v) { return !std::isnan(v); }

struct AudioInfo {
  bool present = false;
  std::string codec;
  std::optional<double> duration_s;
  std::optional<double> silent_from_s;  // start of a silent tail, if any
};

// What the container says, plus what decoding found.
struct ClipInfo {
  std::string path;
  std::string sha256;
  std::string container;
  std::string codec;
  int width = 0;  // displayed size, after rotation
  int height = 0;
  double fps = 0;  // average frame rate (frames / duration)
  int64_t frame_count = 0;
  double duration_s = 0;
  std::string pix_fmt;
  int bit_depth = 8;
  int rotation = 0;  // degrees clockwise applied to display the picture
  AudioInfo audio;
};

// Timing facts about the video stream, measured from real timestamps.
struct StreamFacts {
  double video_duration_s = 0;
  std::optional<double> audio_duration_s;
  std::optional<double> mismatch_s;  // |audio - video| when both exist
  bool vfr = false;
  int dropped_frames = 0;          // gaps of ~2+ nominal intervals
  int duplicate_timestamps = 0;    // frames whose time repeats the previous
  // What the decoder said about damage (video files; 0 for frame folders):
  int decode_errors = 0;     // packets or frames the decoder refused
  int concealed_frames = 0;  // frames it output with damage hidden (flagged corrupt/concealed)
  int lost_frames = 0;       // packets that never came out as a frame
};

// One per-frame series, e.g. "warp_error". values.size() == frame count.
struct MetricSeries {
  std::string metric;
  std::vector<double> values;
};

enum class Severity { info, review, reject };
const char* to_string(Severity s);
std::optional<Severity> severity_from_string(const std::string& s);

// An incoherent stretch of one metric; frames inclusive.
struct Segment {
  std::string metric;
  int64_t start_frame = 0;
  int64_t end_frame = 0;
  double start_s = 0;
  double end_s = 0;
  double peak = 0;
  int64_t peak_frame = 0;
  Severity severity = Severity::info;
};

struct MetricSummary {
  std::string metric;
  double mean = kUndefined;
  double p50 = kUndefined;
  double p95 = kUndefined;
  double max = kUndefined;
};

struct Summary {
  std::vector<MetricSummary> metrics;
  double coherence = 100;  // 0-100, README states the formula
  StreamFacts stream;
  // Clip-level statistics that belong to one metric (flicker index, flash
  // counts, ...), keyed by metric name; written under summary.<metric>.
  nlohmann::json details = nlohmann::json::object();
};

// An object followed through the clip (drift), as the report carries it:
// typed from the tracker to the JSON writer and back from the reader, so no
// part of the program reads these values out of JSON it wrote itself.
// Numbers are held as written (rounded to the report's precision); NaN
// (kUndefined) where a value was not measured, written as JSON null.

// A rectangle; NaN members when unknown.
struct BoxValues {
  double x = kUndefined;
  double y = kUndefined;
  double width = kUndefined;
  double height = kUndefined;
};

// One sample of an object (about 8 per second; always its first, last
// and worst frame).
struct TrackedSample {
  int64_t frame = 0;
  BoxValues box_px;    // in pixels of the working frame (TrackedObject::working_*)
  BoxValues box_frac;  // the same box as fractions of the frame
  double drift = kUndefined;            // combined departure from the first look
  double color_de00 = kUndefined;       // CIEDE2000 from the first look's colour
  double own_color_de00 = kUndefined;   // the same with the object's brightness change removed
  double structure = kUndefined;        // structure departure (0-1)
  double size_pct = kUndefined;         // size change from the first look, percent
  double size_window_pct = kUndefined;  // size change within the recent window, percent
  double visible_pct = kUndefined;      // share of the object not hidden, percent
};

// A stretch where one object drifted (hysteresis on its own drift series).
struct DriftStretch {
  int64_t start_frame = 0;
  int64_t end_frame = 0;
  double start_s = kUndefined;
  double end_s = kUndefined;
  double peak = kUndefined;
  int64_t peak_frame = 0;
  // Which reading departed most at the peak: "color" (CIEDE2000 of the mean
  // colour), "own_color" (the same with the object's brightness change taken
  // out), "quarter_color" (the same on a quarter of a scene cell), "structure"
  // (markings and texture) or "size"; empty when unknown
  // (reports written before it was recorded).
  std::string aspect;
};

// What was followed: a region that moves against the camera, or a cell of
// the scene carried with the camera.
enum class TrackedKind { moving, scene };
const char* to_string(TrackedKind kind);
std::optional<TrackedKind> tracked_kind_from_string(const std::string& s);

struct TrackedObject {
  int id = 0;
  int64_t first_frame = 0;
  int64_t last_frame = 0;
  bool vanished = false;
  std::string end_reason;  // "clip_end", "left_frame", "vanished", "lost", "cut"
  TrackedKind kind = TrackedKind::moving;
  int64_t reference_frame = 0;  // the frame of the first look every look is compared with
  int working_width = 0;        // the frame size box_px is measured in
  int working_height = 0;
  std::vector<TrackedSample> samples;  // by frame
  double peak_drift = kUndefined;
  std::optional<int64_t> peak_frame;
  double drift_rate_per_s = kUndefined;       // Theil-Sen slope of drift over time
  double color_de00_rate_per_s = kUndefined;  // the same for color_de00
  std::vector<DriftStretch> drift_segments;
};

enum class Verdict { pass, review, reject };
const char* to_string(Verdict v);

struct VerdictResult {
  Verdict status = Verdict::pass;
  std::vector<std::string> reasons;  // human-readable, name metric, value, threshold, time
};

struct Report {
  std::string tool_name = "clipwarden";
  std::string tool_version;
  ClipInfo clip;
  nlohmann::json settings = nlohmann::json::object();
  std::vector<double> frame_times_s;  // t of each decoded frame
  std::vector<MetricSeries> series;   // one per per-frame metric column
  std::vector<Segment> segments;
  Summary summary;
  std::vector<TrackedObject> objects;
  VerdictResult verdict;
  std::vector<std::string> notes;  // e.g. the flash screening caution

  const MetricSeries* find_series(const std::string& metric) const;
  MetricSeries* find_series(const std::string& metric);
  const MetricSummary* find_summary(const std::string& metric) const;
};

}  // namespace clipwarden
