#include "report/html/object_boxes.h"

#include <algorithm>
#include <cmath>

namespace framelint {

std::vector<ObjectBox> object_boxes(const TrackedObject& object) {
  std::vector<ObjectBox> out;
  const auto it = object.detail.find("boxes");
  if (it == object.detail.end() || !it->is_array()) return out;
  for (const auto& row : *it) {
    if (!row.is_array() || row.size() < 5) continue;
    bool numeric = true;
    for (size_t i = 0; i < 5; ++i) numeric = numeric && row[i].is_number();
    if (!numeric) continue;
    const double w = row[3].get<double>(), h = row[4].get<double>();
    if (!(w > 0 && h > 0)) continue;
    out.push_back({row[0].get<int64_t>(),
                   cv::Rect(static_cast<int>(std::lround(row[1].get<double>())),
                            static_cast<int>(std::lround(row[2].get<double>())),
                            std::max(1, static_cast<int>(std::lround(w))),
                            std::max(1, static_cast<int>(std::lround(h))))});
  }
  std::sort(out.begin(), out.end(), [](const auto& a, const auto& b) { return a.frame < b.frame; });
  return out;
}

std::optional<cv::Rect> object_box_at(const TrackedObject& object, int64_t frame) {
  if (frame < object.first_frame || frame > object.last_frame) return std::nullopt;
  std::optional<cv::Rect> found;
  for (const auto& b : object_boxes(object)) {
    if (b.frame > frame) break;
    found = b.box_px;
  }
  return found;
}

std::optional<ObjectBox> object_first_box(const TrackedObject& object) {
  auto boxes = object_boxes(object);
  if (boxes.empty()) return std::nullopt;
  return boxes.front();
}

std::optional<double> object_drift_at(const TrackedObject& object, int64_t frame) {
  const auto it = object.detail.find("drift");
  if (it == object.detail.end() || !it->is_array()) return std::nullopt;
  std::optional<double> found;
  int64_t index = object.first_frame;
  for (const auto& entry : *it) {
    if (entry.is_array() && entry.size() >= 2 && entry[0].is_number() && entry[1].is_number()) {
      if (entry[0].get<int64_t>() > frame) break;
      found = entry[1].get<double>();
    } else if (entry.is_number()) {
      if (index > frame) break;
      found = entry.get<double>();
      ++index;
    }
  }
  return found;
}

std::vector<const TrackedObject*> objects_at_frame(const Report& report, int64_t frame,
                                                   size_t max_count) {
  std::vector<std::pair<double, const TrackedObject*>> ranked;
  for (const auto& object : report.objects) {
    if (!object_box_at(object, frame)) continue;
    const double drift = object_drift_at(object, frame).value_or(-1.0);
    ranked.emplace_back(std::isfinite(drift) ? drift : -1.0, &object);
  }
  std::stable_sort(ranked.begin(), ranked.end(),
                   [](const auto& a, const auto& b) { return a.first > b.first; });
  std::vector<const TrackedObject*> out;
  for (const auto& [drift, object] : ranked) {
    if (out.size() >= max_count) break;
    out.push_back(object);
  }
  return out;
}

}  // namespace framelint
