#include "support/noted_defect_time.h"

#include <algorithm>
#include <cctype>
#include <regex>

namespace clipwarden::corpus {

NotedTime noted_time(const std::string& defect_note, double fps, int frames) {
  NotedTime t;
  if (fps <= 0) return t;
  std::string note = defect_note;
  std::transform(note.begin(), note.end(), note.begin(), [](unsigned char c) { return std::tolower(c); });
  int first = -1, last = -1;
  auto take = [&](int f) {
    first = first < 0 ? f : std::min(first, f);
    last = std::max(last, f);
  };
  // "f12", "f12-18", "~f15-24"; the f must start a word ("elf5" is not a frame).
  static const std::regex frame_ref(R"((^|[^a-z0-9])f(\d+)(\s*-\s*f?(\d+))?)");
  for (auto it = std::sregex_iterator(note.begin(), note.end(), frame_ref); it != std::sregex_iterator(); ++it) {
    take(std::stoi((*it)[2]));
    if ((*it)[4].matched) take(std::stoi((*it)[4]));
  }
  // "the last 2 frames", "in the last ~4 frames".
  static const std::regex last_frames(R"(last\s*~?\s*(\d+)\s*frames)");
  std::smatch m;
  if (frames > 0 && std::regex_search(note, m, last_frames)) {
    const int n = std::stoi(m[1]);
    take(std::max(0, frames - n));
    take(frames - 1);
  }
  if (first < 0) return t;
  t.whole_clip = false;
  t.start_s = first / fps;
  t.end_s = last / fps;
  return t;
}

const char* to_string(FlagTiming t) {
  switch (t) {
    case FlagTiming::at_noted_time:
      return "at the time noted";
    case FlagTiming::elsewhere:
      return "elsewhere in the clip";
    case FlagTiming::clip_level_only:
      return "by a clip-level rule only";
    case FlagTiming::not_flagged:
      break;
  }
  return "not flagged";
}

FlagTiming flag_timing(const Report& report, const NotedTime& noted, double fps) {
  const double slack = std::max(0.25, fps > 0 ? 1 / fps : 0.0);
  bool above_info = false;
  for (const auto& s : report.segments) {
    if (s.severity == Severity::info) continue;
    above_info = true;
    if (noted.whole_clip || (s.end_s >= noted.start_s - slack && s.start_s <= noted.end_s + slack))
      return FlagTiming::at_noted_time;
  }
  if (above_info) return FlagTiming::elsewhere;
  return report.verdict.status == Verdict::pass ? FlagTiming::not_flagged : FlagTiming::clip_level_only;
}

}  // namespace clipwarden::corpus
