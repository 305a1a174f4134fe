// Finding transitions in one location's brightness over time.
//
// WCAG 2.x, definition "general flash and red flash thresholds", note: "A
// transition is the change in relative luminance (or relative luminance/color
// for red flashing) between adjacent peaks and valleys in a plot of relative
// luminance ... measurement against time. A flash consists of two opposing
// transitions." A SwingTracker follows the peaks and valleys of one sampled
// signal with hysteresis: a transition is reported at the first sample where
// the signal has moved by at least the threshold away from the last extreme
// (the peak or valley it left), so small wiggles never count and a slow ramp
// counts once.
#pragma once

#include <cstdint>

namespace clipwarden::flash {

enum class Swing : int8_t { none = 0, up = 1, down = -1 };

// One sample of a tracked signal: its value and whether the state is a
// "saturated red" (red rule only; always false for the general rule).
struct SwingSample {
  float value = 0;
  bool saturated = false;
};

// What a transition must satisfy besides its size.
struct SwingRule {
  float min_change = 0;        // size of the swing between the two states
  bool change_strict = false;  // true: change > min_change; false: >=
  // General rule: the darker state's value must be below this (WCAG: "the
  // relative luminance of the darker image is below 0.80"). Red rule: none.
  float darker_below = 2.0f;
  // Red rule: one of the two states must be saturated red.
  bool needs_saturated = false;
};

// The extremes of one location. 12 bytes, so a 300x300 grid costs ~1 MB.
//
// Turning round is decided on size alone (pure peak/valley detection with
// hysteresis); whether a swing is reported as a transition is decided on the
// states it joins, and may happen on a later sample of the same swing: a fall
// from 1.0 that passes 0.85 is not yet a general transition (darker state not
// below 0.8) but becomes one when it reaches 0.5.
class SwingTracker {
 public:
  // Feeds one sample; returns the direction of a transition reported at this
  // sample, or none. Each swing is reported at most once.
  Swing update(const SwingSample& s, const SwingRule& rule);

  // The current swing: the extreme it left and the furthest value reached.
  float origin() const { return origin_; }
  float extreme() const { return extreme_; }

  // Samples in [lo, hi] certainly leave the tracker as it is and report
  // nothing, so a caller may skip update() for them (the flash grid's cells
  // are quiet most of the time). Empty (lo > hi) before the first sample.
  void quiet_range(const SwingRule& rule, float& lo, float& hi) const;

 private:
  bool qualifies(const SwingRule& rule) const;

  // Before the first swing `origin_` holds the lowest value so far and
  // `extreme_` the highest; afterwards `origin_` is the extreme the current
  // swing left and `extreme_` the furthest value it has reached.
  float origin_ = 0, extreme_ = 0;
  bool origin_saturated_ = false, extreme_saturated_ = false;
  bool started_ = false, reported_ = false;
  Swing dir_ = Swing::none;
};

}  // namespace clipwarden::flash
