// When a defect a person saw happens, read from the words of the corpus
// manifest's "visible defect" note ("... appears ~f12-18 then vanishes",
// "... between f10 and f12", "... in the last 2 frames", "... frame-to-frame"),
// and whether a report flags the clip at that time. The goal is a
// flag at the time noted, not only somewhere in the clip: a clip-level
// median that happens to cross its level says little about what a reviewer
// will be shown.
#pragma once

#include <string>

#include "clipwarden/report.h"

namespace clipwarden::corpus {

// A stretch of the clip in seconds; whole_clip when the note names no frames
// (a defect seen "every frame" or "frame-to-frame").
struct NotedTime {
  double start_s = 0;
  double end_s = 0;
  bool whole_clip = true;
};

// The note's frame numbers are the file's stored frames, counted from 0 at
// the manifest's frame rate `fps`; `frames` is the file's frame count (for
// "the last N frames"). Every "fN" and "fN-M" in the note counts: the
// stretch runs from the smallest to the largest.
NotedTime noted_time(const std::string& defect_note, double fps, int frames);

enum class FlagTiming {
  at_noted_time,    // a review or reject segment overlaps the noted stretch
  elsewhere,        // segments above info, none near the noted stretch
  clip_level_only,  // flagged only by a clip-level rule (no segment above info)
  not_flagged,
};
const char* to_string(FlagTiming t);

// How `report` flags the noted stretch. A segment counts when it comes
// within `slack_s` of the stretch: the larger of 0.25 s (the onset
// tolerance for sudden defects) and one frame of the clip, since a note's
// "~f15" is read by eye.
FlagTiming flag_timing(const Report& report, const NotedTime& noted, double fps);

}  // namespace clipwarden::corpus
