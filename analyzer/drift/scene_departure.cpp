#include "analyzer/drift/scene_departure.h"

#include <algorithm>
#include <cmath>
#include <map>

namespace clipwarden::drift {
namespace {

// One own-colour reading of a moving object.
struct OwnReading {
  double t_s;
  int object;
  bool departed;
  float box_area_px;
};

}  // namespace

std::vector<int64_t> hold_scene_departures(std::vector<ObjectTrack>& objects, double frame_area_px,
                                           const SceneDepartureRule& rule) {
  std::vector<OwnReading> readings;
  for (const ObjectTrack& object : objects) {
    if (object.kind != ObjectKind::moving) continue;
    for (const ObjectSample& s : object.history) {
      if (std::isfinite(s.own_colour_de00))
        readings.push_back(
            {s.t_s, object.id, s.own_colour_de00 >= rule.departed_own_de00, s.box.area()});
    }
  }
  std::sort(readings.begin(), readings.end(),
            [](const OwnReading& a, const OwnReading& b) { return a.t_s < b.t_s; });
  std::vector<int64_t> held;
  // Per other object read in the window: its largest box while departed
  // there (0 when it never departed).
  std::map<int, float> departed_area;
  for (ObjectTrack& object : objects) {
    if (object.kind != ObjectKind::moving) continue;
    for (ObjectSample& s : object.history) {
      if (!(s.drift > rule.held_drift)) continue;
      if (s.aspect != DriftAspect::own_colour && s.aspect != DriftAspect::structure) continue;
      const auto first = std::lower_bound(
          readings.begin(), readings.end(), s.t_s - rule.window_s - 1e-9,
          [](const OwnReading& r, double t) { return r.t_s < t; });
      int count = 0, departed = 0;
      departed_area.clear();
      for (auto it = first; it != readings.end() && it->t_s <= s.t_s + rule.window_s + 1e-9; ++it) {
        if (it->object == object.id) continue;
        ++count;
        float& area = departed_area[it->object];
        if (!it->departed) continue;
        ++departed;
        area = std::max(area, it->box_area_px);
      }
      double area_px = 0;
      for (const auto& [id, area] : departed_area) area_px += area;
      const double area_share = area_px / std::max(1.0, frame_area_px);
      if (static_cast<int>(departed_area.size()) < rule.min_other_objects) continue;
      if (departed < rule.min_departed_share * count) continue;
      if (area_share < rule.min_departed_area_share) continue;
      s.drift = static_cast<float>(rule.held_drift);
      held.push_back(s.frame);
    }
  }
  std::sort(held.begin(), held.end());
  held.erase(std::unique(held.begin(), held.end()), held.end());
  return held;
}

}  // namespace clipwarden::drift
