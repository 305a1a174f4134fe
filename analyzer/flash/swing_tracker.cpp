#include "analyzer/flash/swing_tracker.h"

#include <algorithm>
#include <cmath>

namespace clipwarden::flash {
namespace {

// Values come from 8-bit frames through float arithmetic: a black-to-white
// step of exactly the threshold must not be lost to rounding, and a strict
// "> 20" must not be met by a change of 20 plus rounding noise.
bool size_met(float size, const SwingRule& rule) {
  if (rule.change_strict) return size > rule.min_change * (1.0f + 1e-5f);
  return size >= rule.min_change * (1.0f - 1e-5f);
}

}  // namespace

bool SwingTracker::qualifies(const SwingRule& rule) const {
  if (!size_met(std::fabs(extreme_ - origin_), rule)) return false;
  if (std::min(origin_, extreme_) >= rule.darker_below) return false;
  return !rule.needs_saturated || origin_saturated_ || extreme_saturated_;
}

Swing SwingTracker::update(const SwingSample& s, const SwingRule& rule) {
  if (!started_) {
    origin_ = extreme_ = s.value;
    origin_saturated_ = extreme_saturated_ = s.saturated;
    started_ = true;
    return Swing::none;
  }
  if (dir_ == Swing::none) {
    // origin_ = lowest so far, extreme_ = highest so far.
    const float rise = s.value - origin_, fall = extreme_ - s.value;
    if (size_met(std::max(rise, fall), rule)) {
      dir_ = rise >= fall ? Swing::up : Swing::down;
      if (dir_ == Swing::down) {
        origin_ = extreme_;
        origin_saturated_ = extreme_saturated_;
      }
      extreme_ = s.value;
      extreme_saturated_ = s.saturated;
    } else {
      if (s.value < origin_) origin_ = s.value, origin_saturated_ = s.saturated;
      if (s.value > extreme_) extreme_ = s.value, extreme_saturated_ = s.saturated;
      return Swing::none;
    }
  } else {
    const float sign = dir_ == Swing::up ? 1.0f : -1.0f;
    if (sign * (s.value - extreme_) > 0) {
      extreme_ = s.value;  // the swing goes on
      extreme_saturated_ = s.saturated;
    } else if (size_met(sign * (extreme_ - s.value), rule)) {
      // Turned round: the extreme reached is the new swing's origin.
      dir_ = dir_ == Swing::up ? Swing::down : Swing::up;
      origin_ = extreme_;
      origin_saturated_ = extreme_saturated_;
      extreme_ = s.value;
      extreme_saturated_ = s.saturated;
      reported_ = false;
    }
  }
  if (reported_ || !qualifies(rule)) return Swing::none;
  reported_ = true;
  return dir_;
}

// Why these samples change nothing. Before the first swing, a sample within
// [lowest, highest] moves neither, and rise and fall are at most the range,
// which has not met the size (or a swing would have begun): update returns
// before the report check. Inside a swing, a sample that does not go beyond
// the extreme and comes back by less than the size changes no state; the
// report check then gives what it gave at the previous sample (every change
// of state ends in that check), i.e. nothing new. The comeback bound is
// checked with size_met itself, so float rounding cannot make it wrong:
// size_met is monotonic and so is the rounded difference.
void SwingTracker::quiet_range(const SwingRule& rule, float& lo, float& hi) const {
  lo = 1.0f, hi = 0.0f;  // empty
  if (!started_) return;
  const float margin = 0.99f * rule.min_change;
  if (dir_ == Swing::none) {
    if (!size_met(extreme_ - origin_, rule)) lo = origin_, hi = extreme_;
  } else if (dir_ == Swing::up) {
    const float bound = extreme_ - margin;
    if (bound <= extreme_ && !size_met(extreme_ - bound, rule)) lo = bound, hi = extreme_;
  } else {
    const float bound = extreme_ + margin;
    if (bound >= extreme_ && !size_met(bound - extreme_, rule)) lo = extreme_, hi = bound;
  }
}

}  // namespace clipwarden::flash
