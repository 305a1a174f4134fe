// The --defect SPEC language of `clipwarden inject` (docs/inject.md):
//
//   CLASS@RANGE[:KEY=VALUE[,KEY=VALUE...]]
//
//   RANGE  30-59 (frames, inclusive) | 30 (one frame) | 30- (to the end)
//          2s-4s | 2.5s | 2s-  (seconds from the first frame; a frame at
//          time t is inside when start <= t < end)
//   KEY    strength=weak|moderate|strong|NUMBER (in the class's own unit),
//          region=X/Y/W/H (fractions of the frame), and per-class keys.
//
// Parsing checks everything that can be checked without the clip; errors
// name the spec and the part at fault.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "clipwarden/error.h"

namespace clipwarden::inject {

enum class DefectClass {
  flicker,        // whole-frame luminance pulses
  local_flicker,  // a region's luminance pulses
  boiling,        // fresh noise every frame in a region
  colour_drift,   // a region's hue drifts, growing over time
  shape_drift,    // a region is scaled up, growing over time
  vanish,         // a region fades into its surroundings
  freeze,         // frames repeat the frame before the range
  drop,           // frames are removed (their timestamps go with them)
  cut,            // frames are replaced by frames from elsewhere
  jerk,           // frames are displaced as if the camera jumped
  strobe,         // whole-frame light/dark alternation (flashes)
};
inline constexpr int kDefectClassCount = 11;
const char* to_string(DefectClass c);
std::optional<DefectClass> defect_class_from_string(const std::string& name);
std::vector<DefectClass> all_defect_classes();

enum class StrengthLevel { weak, moderate, strong };
const char* to_string(StrengthLevel level);

// The class's strength for a named level, in its own unit, and that unit
// (for the docs and the truth file).
double strength_for_level(DefectClass c, StrengthLevel level);
const char* strength_unit(DefectClass c);
// True for classes whose strength is the length of their range (freeze, drop).
bool strength_is_range_length(DefectClass c);
// True for classes that act inside a region.
bool has_region(DefectClass c);

struct SpecRange {
  bool in_seconds = false;
  double start = 0;           // frame index or seconds
  std::optional<double> end;  // inclusive frame, or exclusive seconds; none = clip end
  bool single_frame = false;  // "@30" or "@2.5s": one frame (the first at or after the time)
};

// A rectangle in fractions of the frame size.
struct NormalizedRegion {
  double x = 0, y = 0, w = 0, h = 0;
};

struct DefectSpec {
  std::string text;  // the spec as given, for errors and the truth file
  DefectClass cls = DefectClass::flicker;
  SpecRange range;
  std::optional<double> strength;  // none: the class default (moderate)
  std::optional<StrengthLevel> level;

  // Region classes.
  std::optional<NormalizedRegion> region;  // none: chosen from the seed
  double region_size = 0.3;                // side of an automatic region, fraction of the frame
  bool track = true;                       // follow the content by optical flow

  // Pulsing classes (flicker, local_flicker, strobe): pulse frequency.
  double hz = 0;  // 0 = class default
  bool sine = false;  // flicker wave: square (default) or sine

  double grain_px = 0;  // boiling: noise blob size; 0 = 1% of the long side
  std::optional<double> direction_deg;  // jerk: displacement direction

  // cut: where the spliced frames come from.
  std::string source_path;              // empty = the clip itself
  std::optional<int64_t> source_start;  // first source frame; none = far from the range

  double strength_value() const;  // strength, or the class's moderate level
};

Expected<DefectSpec> parse_defect_spec(const std::string& text);

// A pulsing class's rate when the spec gives none: flicker a few times a
// second (the band where luminance flicker is most visible, common
// practice); strobe above WCAG's three flashes in any one second. At or
// above half the frame rate a pulse alternates every other frame.
double default_pulse_hz(DefectClass c);

}  // namespace clipwarden::inject
