// A departure spread over the scene's moving objects at once is the scene's
// (fire, light, water), not one object's drift.
//
// Flames that rise and cool from yellow to red are followed as objects, and
// each departs from its first look as a generated recolour would: every
// point of it, by ΔE00 10-35 of its own colour (docs/drift.md, "the scene's
// own change"). What a recolour does and burning does not is to leave the
// rest of the scene alone: on the wall of fire 40-96% of the other moving
// objects' readings within a second of a review-level one had departed too,
// against 10-24% beside the model outputs' visible defects (a guitar whose
// colour flips, hair that morphs).
#pragma once

#include <cstdint>
#include <vector>

#include "analyzer/drift/object_track.h"

namespace clipwarden::drift {

struct SceneDepartureRule {
  double window_s = 1.0;          // other objects' readings within this time either side
  double departed_own_de00 = 4;   // an own colour change from this counts as departed
  double min_departed_share = 0.32;  // of the other readings in the window
  int min_other_objects = 2;      // the window must hold readings of this many other objects
  // The departed other objects' boxes (each at its largest while departed
  // in the window) must cover this share of the frame together: a recolour
  // of one region passes to the few objects that cross it.
  double min_departed_area_share = 0.08;
  double held_drift = 0.9;        // such a reading counts at most this (under review)
};

// Holds under review (at `rule.held_drift`) every moving object's own-colour
// and structure reading above it that the rule finds spread over the scene;
// returns the frames of the readings held, in increasing order, each once.
// Reads and changes only the objects' histories.
std::vector<int64_t> hold_scene_departures(std::vector<ObjectTrack>& objects, double frame_area_px,
                                           const SceneDepartureRule& rule = {});

}  // namespace clipwarden::drift
