#include "analyzer/policy/plain_words.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstdlib>

namespace clipwarden {
namespace {

std::string spoken_duration(double s) {
  char buf[32];
  std::snprintf(buf, sizeof buf, s < 10 ? "%.1f s" : "%.0f s", s);
  return buf;
}

// From the first frame to the end of the last frame's interval.
double span_s(const Report& r, int64_t first, int64_t last) {
  const auto& t = r.frame_times_s;
  if (t.empty() || first < 0 || last < first || static_cast<size_t>(last) >= t.size()) return 0;
  double end = t[last];
  if (static_cast<size_t>(last + 1) < t.size())
    end = t[last + 1];
  else if (t.size() > 1)
    end += (t.back() - t.front()) / static_cast<double>(t.size() - 1);
  return std::max(0.0, end - t[first]);
}

std::string times(int n) {
  return n == 1 ? "once" : n == 2 ? "twice" : std::to_string(n) + " times";
}

// The block of flicker_local that pulsed most, as "a region at the lower
// left brightens and darkens 4 times".
std::string local_pulse_words(const Report& r) {
  if (!r.summary.details.contains("flicker_local")) return "a region brightens and darkens";
  const auto& d = r.summary.details["flicker_local"];
  if (!d.contains("blocks") || !d["blocks"].is_array() || d["blocks"].empty() ||
      !d.contains("grid"))
    return "a region brightens and darkens";
  const auto& b = d["blocks"][0];
  const int cols = d["grid"][0].get<int>(), rows = d["grid"][1].get<int>();
  return "a region at " + grid_place(b.value("row", 0), b.value("col", 0), rows, cols) +
         " brightens and darkens " + times(b.value("pulses", 1));
}

// The followed object whose drift stretch overlapping frames first..last
// peaked highest, as "an object at the lower right (7% of the frame)
// changes colour" (a scene cell: "the background at ..."). The aspect is
// the reading that departed most at the stretch's peak; the place is the
// object's box at the look nearest that peak.
std::string drift_words(const Report& r, int64_t first, int64_t last) {
  const TrackedObject* object = nullptr;
  const DriftStretch* stretch = nullptr;
  for (const auto& o : r.objects)
    for (const auto& s : o.drift_segments)
      if (s.end_frame >= first && s.start_frame <= last && (!stretch || s.peak > stretch->peak))
        object = &o, stretch = &s;
  const std::string generic = "an object's colour, markings or shape change as it moves";
  if (!stretch) return generic;
  const TrackedSample* look = nullptr;
  for (const auto& s : object->samples) {
    if (!std::isfinite(s.box_frac.x) || !std::isfinite(s.box_frac.width)) continue;
    if (!look || std::llabs(s.frame - stretch->peak_frame) < std::llabs(look->frame - stretch->peak_frame))
      look = &s;
  }
  std::string who = object->kind == TrackedKind::moving         ? "an object"
                    : stretch->aspect == "quarter_color" ? "a part of the background"
                                                         : "the background";
  if (look) {
    const auto& b = look->box_frac;
    const int row = std::clamp(static_cast<int>(3 * (b.y + b.height / 2)), 0, 2);
    const int col = std::clamp(static_cast<int>(3 * (b.x + b.width / 2)), 0, 2);
    char area[48];
    std::snprintf(area, sizeof area, " (%.0f%% of the frame)",
                  std::max(1.0, std::round(100 * b.width * b.height)));
    who += " at " + grid_place(row, col, 3, 3) + area;
  }
  const std::string& a = stretch->aspect;
  std::string what = " changes colour, markings or shape";
  if (a == "color" || a == "own_color" || a == "quarter_color") what = " changes colour";
  if (a == "structure") what = " changes its markings or texture";
  if (a == "size")
    what = !look || !std::isfinite(look->size_window_pct) ? " changes size"
           : look->size_window_pct > 0                    ? " grows"
                                                          : " shrinks";
  const bool gone = object->vanished && object->last_frame >= first && object->last_frame <= last + 1;
  return who + what + (gone ? " and vanishes" : "");
}

}  // namespace

std::string grid_place(int row, int col, int rows, int cols) {
  const char* vertical = rows <= 1             ? ""
                         : 3 * row < rows      ? "upper"
                         : 3 * row >= 2 * rows ? "lower"
                                               : "";
  const char* horizontal = cols <= 1             ? ""
                           : 3 * col < cols      ? "left"
                           : 3 * col >= 2 * cols ? "right"
                                                 : "";
  const std::string v = vertical, h = horizontal;
  if (v.empty() && h.empty()) return "the centre";
  if (v.empty()) return "the middle " + h;
  if (h.empty()) return "the " + v + " middle";
  return "the " + v + " " + h;
}

std::string plain_words(const Report& r, const std::string& metric, int64_t first, int64_t last,
                        int count) {
  const std::string over = spoken_duration(span_s(r, first, last));
  const std::string again = count > 1 ? ", " + times(count) + " in the clip" : "";
  if (metric == "freeze") return "the picture stands still for " + over + again;
  if (metric == "cut")
    return "the picture jumps to a different view" +
           std::string(count > 1 ? " " + times(count) : "");
  if (metric == "jump_cut")
    return "the picture jumps within the shot, as if frames were cut out" + again;
  if (metric == "jerk" || metric == "jolt")
    return "the camera jolts" + std::string(count > 1 ? " " + times(count) : "");
  if (metric == "warp_error" || metric == "warp_error_ratio")
    return "the picture changes more than its motion explains, for " + over + again;
  if (metric == "warp_error_smooth" || metric == "warp_error_smooth_ratio")
    return "whole regions change more than the motion explains, not just a fine pattern, for " + over + again;
  if (metric == "warp_error_long" || metric == "warp_error_long_ratio")
    return "the picture slowly turns into something else over " + over + again;
  if (metric == "occluded_pct")
    return "much of the picture cannot be followed from frame to frame for " + over;
  if (metric == "flicker") return "the whole picture brightens and darkens over " + over + again;
  if (metric == "flicker_local") return local_pulse_words(r) + " in " + over;
  if (metric == "boiling") return "a texture is re-drawn every frame for " + over + again;
  if (metric == "drift") return drift_words(r, first, last) + ", over " + over;
  if (metric == "flash") return "the picture flashes";
  return "";
}

}  // namespace clipwarden
