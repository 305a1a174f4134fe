// Whether a change of light comes once or repeats. Natural light changes
// once: a camera's exposure steps up and back, firelight dips, a door opens,
// a bright object leaves the picture in a pan. Generated flicker repeats in
// place: the picture brightens and darkens again and again. So a flicker
// series is read as excursions - maximal runs of frames on one side of the
// slow level, at least `min_level` away from it - and an excursion with no
// comparable excursion near it in time is "lone".
#pragma once

#include <span>
#include <vector>

namespace clipwarden {

struct ExcursionRule {
  // A frame belongs to an excursion when |value| >= min_level.
  double min_level = 0.02;
  // Two excursions are comparable when each one's peak |value| is at least
  // this share of the other's.
  double comparable_share = 0.5;
  // ... and when the time between the two (end of one to start of the
  // other) is at most this.
  double within_s = 1.0;
};

// Per frame: true where the frame lies in an excursion that no comparable
// excursion repeats within `within_s`; false elsewhere (frames outside any
// excursion included). `signed_values`: the signed departure from the slow
// level (NaN = undefined, ends an excursion); `times_s`: the frames' times.
std::vector<bool> lone_excursion_frames(std::span<const double> signed_values,
                                        std::span<const double> times_s, const ExcursionRule& rule);

}  // namespace clipwarden
