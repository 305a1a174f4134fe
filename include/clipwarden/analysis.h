// Analysing one clip: decode, follow motion with optical flow, measure each
// metric per frame, find incoherent segments, summarise and judge.
#pragma once

#include <cstdint>
#include <functional>
#include <map>
#include <optional>
#include <string>

#include <nlohmann/json.hpp>

#include "clipwarden/clip_source.h"
#include "clipwarden/error.h"
#include "clipwarden/policy.h"
#include "clipwarden/report.h"

namespace clipwarden {

// Optical flow effort (OpenCV DIS presets): fast = ULTRAFAST,
// balanced = FAST, thorough = MEDIUM.
enum class Preset { fast, balanced, thorough };
const char* to_string(Preset p);
std::optional<Preset> preset_from_string(const std::string& s);

struct AnalysisSettings {
  Preset preset = Preset::balanced;
  int working_long_side = 512;       // --width
  // Worker threads for frame pairs (0 = hardware concurrency); decoding
  // runs on one more. OpenCV's own thread pool is process-wide and nests
  // inside every worker's flow and remap calls, oversubscribing the cores
  // (14% more CPU per frame measured at 1080p on 2 cores): programs that
  // embed the library should call cv::setNumThreads(1) once at start-up,
  // as the clipwarden CLI does.
  int threads = 0;
  std::optional<double> folder_fps;  // for frame folders
  int long_range_k = 5;              // frames spanned by the long-range warp error
  int max_objects = 8;               // drift: objects followed at once
};

// The settings as written into report.settings (and hashed by the store).
nlohmann::json settings_to_json(const AnalysisSettings& settings);
// Back from that record, with defaults for anything missing or malformed.
AnalysisSettings settings_from_json(const nlohmann::json& settings);

// Where the time went, summed over threads (milliseconds of thread time).
// Filled when AnalysisHooks::timings is set; used by the benchmark.
struct PipelineTimings {
  double decode_ms = 0;     // reading, decoding, scaling, preparing planes
  double pair_ms = 0;       // flow both ways, occlusion, warp, camera fit
  std::map<std::string, double> metric_ms;  // per metric (first column's name)
  double finish_ms = 0;     // post-processing, segments, summary, verdict
  double wall_ms = 0;
  int64_t frames = 0;
};

// Optional observers of a running analysis. Called on the analysis thread.
struct AnalysisHooks {
  // Every decoded analysis frame, in order (e.g. to keep thumbnails).
  std::function<void(const DecodedFrame&)> on_frame;
  // Frames done so far and the container's estimate of the total (may be 0).
  std::function<void(int64_t done, int64_t expected)> on_progress;
  // If set, filled with per-stage times.
  PipelineTimings* timings = nullptr;
};

Expected<Report> analyze_clip(const std::string& path, const AnalysisSettings& settings,
                              const Policy& policy, const AnalysisHooks& hooks = {});

// The same analysis over a source you opened or wrote yourself (frames
// already in memory, a camera, a test). `path` is what the report names.
Expected<Report> analyze_source(ClipSource& source, const std::string& path,
                                const AnalysisSettings& settings, const Policy& policy,
                                const AnalysisHooks& hooks = {});

}  // namespace clipwarden
