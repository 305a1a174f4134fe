// Injecting known defects into a clean clip (`clipwarden inject`), to
// measure how well the analysis finds them. The copy is a real encoded clip
// (clipwarden/clip_writer.h) and the truth says which defect sits where.
// The defect language is documented in docs/inject.md.
#pragma once

#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "clipwarden/clip_encoding.h"
#include "clipwarden/error.h"

namespace clipwarden {

inline constexpr const char* kInjectTruthSchema = "clipwarden.inject-truth/1";

struct InjectOptions {
  std::vector<std::string> defect_specs;  // --defect SPEC, one per defect
  std::string output_path;                // -o; the extension may follow the codec
  std::string truth_path;                 // empty: <output without extension>.truth.json
  uint64_t seed = 1;                      // every random choice derives from it
  ClipWriterOptions writer;
  // Frames written so far and the container's estimate of the total.
  std::function<void(int64_t done, int64_t expected)> on_progress;
};

// Reads `clip_path` at its native size, applies the defects, writes the copy
// and the truth file, and returns the truth document:
//   {schema, source {path, frame_count, fps, width, height}, output {path,
//    codec, frame_count}, seed, defects: [{class, spec, frames [start, end]
//    (output frames, inclusive), times_s [start, end], strength,
//    strength_unit, level, region {x, y, w, h} in pixels or null,
//    region_track [[frame, x, y, w, h], ...], details {...}}]}
// Spec errors are usage errors naming the spec; an unreadable clip is an
// input error; a failed write is an output error.
Expected<nlohmann::json> inject_defects(const std::string& clip_path, const InjectOptions& options);

}  // namespace clipwarden
