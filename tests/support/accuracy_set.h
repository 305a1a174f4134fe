// The accuracy evaluation's data: clean base clips cut from real footage
// (Debian's opencv-doc package) and from FFmpeg's lavfi test sources, and
// the planned injections (one defect per clip, fixed seeds). Everything is
// generated into a work folder; nothing here is committed.
#pragma once

#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "analyzer/inject/defect_spec.h"
#include "clipwarden/error.h"

namespace clipwarden::accuracy {

// Where a base clip comes from.
struct BaseSource {
  std::string name;        // e.g. "vtest"
  std::string path;        // the full source clip (or a lavfi graph for synthetic ones)
  bool real = true;        // real footage (false alarms are counted on these)
  bool lavfi = false;      // `path` is an FFmpeg lavfi source description
  int first_frame = 0;     // where the base window starts in the source
  bool inject_into = true; // false: only checked clean (e.g. 2 fps footage)
  int max_frames = 0;      // caps the window (e.g. before a scene cut); 0 = no cap
};

// What kind of picture a base holds, for the per-kind rows of the tables:
// "camera" (real footage), "synthetic" (FFmpeg's lavfi sources) or
// "generated" (model outputs of the corpus: their textures and motion are
// not a camera's, and a rule must find defects in them too).
std::string base_kind(const BaseSource& source);

// A prepared base clip: the window, scaled, written losslessly.
struct BaseClip {
  BaseSource source;
  std::string full_path;  // the source clip cuts splice from (same content, any size)
  std::string path;       // the prepared window (FFV1 .mkv)
  int frames = 0;
  double fps = 0;
  int full_frames = 0;  // frames in full_path
};

struct SetOptions {
  std::string work_dir;
  int long_side = 320;   // frames are scaled to this long side
  int max_frames = 120;  // frames per base clip
  // Bases by name or by kind ("vtest", "generated"); empty = every available source.
  std::vector<std::string> base_names;
  // The evaluation corpus (a folder with clips/ and MANIFEST.tsv; "" =
  // none): model outputs from it are bases too (names gen_*), so that a
  // defect is also injected into generated texture.
  std::string corpus_dir;
  std::function<void(const std::string&)> log;
};

// The sources known to the evaluation; those whose file (or ffmpeg, for
// lavfi) is missing are left out with a log line.
std::vector<BaseSource> available_sources(const SetOptions& options);

// Prepares the base clips in work_dir (unpacked opencv-doc clips and
// rendered lavfi sources are kept there and reused by later runs).
Expected<std::vector<BaseClip>> prepare_base_clips(const SetOptions& options);

// One planned injection.
struct PlannedCase {
  std::string id;  // base/class/level/placement
  const BaseClip* base = nullptr;
  inject::DefectClass cls = inject::DefectClass::flicker;
  inject::StrengthLevel level = inject::StrengthLevel::moderate;
  int placement = 0;
  std::string spec;
  uint64_t seed = 1;
  std::string clip_path;  // where the injected clip goes
};

// One case per base clip that takes injections x class x level x placement.
// Defects start at a seeded frame between 30% and 45% of the clip;
// pulsing classes last one second, drift classes run to the end, freeze
// and drop last their level's number of frames, cuts run to the end with
// frames from elsewhere (weak: 1 s away in the same source, moderate: 4 s
// away, strong: another base clip). A cut whose base source is too short
// for its distance either way (most model outputs for the 4 s splice) is
// not planned: a nearer splice would be another strength.
std::vector<PlannedCase> plan_cases(const std::vector<BaseClip>& bases,
                                    const std::vector<inject::DefectClass>& classes,
                                    const std::vector<inject::StrengthLevel>& levels, int placements,
                                    uint64_t seed, const std::string& work_dir);

// Injects one planned case (lossless FFV1); returns the truth document.
Expected<nlohmann::json> inject_case(const PlannedCase& c);

}  // namespace clipwarden::accuracy
