#include "analyzer/drift/scene_departure.h"

#include <algorithm>
#include <cmath>
#include <set>

namespace clipwarden::drift {
namespace {

// One own-colour reading of a moving object.
struct OwnReading {
  double t_s;
  int object;
  bool departed;
};

}  // namespace

std::vector<int64_t> hold_scene_departures(std::vector<ObjectTrack>& objects,
                                           const SceneDepartureRule& rule) {
  std::vector<OwnReading> readings;
  for (const ObjectTrack& object : objects) {
    if (object.kind != ObjectKind::moving) continue;
    for (const ObjectSample& s : object.history) {
      if (std::isfinite(s.own_colour_de00))
        readings.push_back({s.t_s, object.id, s.own_colour_de00 >= rule.departed_own_de00});
    }
  }
  std::sort(readings.begin(), readings.end(),
            [](const OwnReading& a, const OwnReading& b) { return a.t_s < b.t_s; });
  std::vector<int64_t> held;
  std::set<int> others;
  for (ObjectTrack& object : objects) {
    if (object.kind != ObjectKind::moving) continue;
    for (ObjectSample& s : object.history) {
      if (!(s.drift > rule.held_drift)) continue;
      if (s.aspect != DriftAspect::own_colour && s.aspect != DriftAspect::structure) continue;
      const auto first = std::lower_bound(
          readings.begin(), readings.end(), s.t_s - rule.window_s - 1e-9,
          [](const OwnReading& r, double t) { return r.t_s < t; });
      int count = 0, departed = 0;
      others.clear();
      for (auto it = first; it != readings.end() && it->t_s <= s.t_s + rule.window_s + 1e-9; ++it) {
        if (it->object == object.id) continue;
        ++count;
        departed += it->departed;
        others.insert(it->object);
      }
      if (static_cast<int>(others.size()) < rule.min_other_objects) continue;
      if (departed < rule.min_departed_share * count) continue;
      s.drift = static_cast<float>(rule.held_drift);
      held.push_back(s.frame);
    }
  }
  std::sort(held.begin(), held.end());
  held.erase(std::unique(held.begin(), held.end()), held.end());
  return held;
}

}  // namespace clipwarden::drift
