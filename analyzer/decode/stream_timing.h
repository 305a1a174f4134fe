// Timing facts of a video stream from its real timestamps: frame times
// relative to the first frame, duration, variable frame rate, dropped
// frames and repeated timestamps. Free of libav so it is unit-testable; the
// readers feed it timestamps in stream ticks.
#pragma once

#include <cstdint>
#include <optional>
#include <vector>

#include "clipwarden/report.h"

namespace clipwarden::decode {

// Frames missing in one interval of a stream whose usual interval is
// `nominal` (same unit): k - 1 when the interval is within a quarter of an
// interval of a whole multiple k >= 2 of it, else 0. A missing frame leaves
// exactly one more interval; an interval of 1.5 or 1.67 nominal ones is the
// irregular timing of a webcam or a variable-rate capture (a frame came
// late), not a frame that is gone.
int missing_frames(double interval, double nominal);

class StreamTiming {
 public:
  // tick_s: seconds per timestamp tick (the stream time base).
  // fallback_interval_s: the frame interval the container states, used when
  // a frame has no timestamp or the stream has fewer than two frames.
  StreamTiming(double tick_s, double fallback_interval_s);

  // Adds the next frame in presentation order and returns its time in
  // seconds from the first frame. A missing timestamp continues from the
  // previous frame by one nominal interval. duration_ticks <= 0 = unknown.
  double add(std::optional<int64_t> timestamp_ticks, int64_t duration_ticks = 0);

  int64_t frame_count() const {
    return static_cast<int64_t>(intervals_.size()) + (started_ ? 1 : 0);
  }

  // Facts over the frames so far (audio fields left empty):
  //  - nominal interval = median of the positive inter-frame intervals;
  //  - vfr: some positive interval differs from the nominal one by more than
  //    5 % of it plus one tick when ticks are finer than half an interval
  //    (timestamps rounded to a coarse time base, e.g. 1 ms for 29.97 fps,
  //    jitter by one tick without the rate being variable);
  //  - dropped_frames: missing_frames() summed over the intervals;
  //  - duplicate_timestamps: frames whose time does not advance past the
  //    previous frame's;
  //  - video_duration_s: last time + last frame's duration - first time.
  StreamFacts facts() const;

 private:
  double nominal_interval_ticks() const;

  double tick_s_;
  double fallback_interval_ticks_;
  bool started_ = false;
  int64_t first_ = 0;
  int64_t last_ = 0;
  int64_t last_duration_ = 0;
  std::vector<int64_t> intervals_;  // 8 bytes a frame: the only per-frame state kept
};

}  // namespace clipwarden::decode
