#include "analyzer/core/object_boxes.h"

#include <algorithm>
#include <cmath>

namespace clipwarden {
namespace {

// Rows [frame, a, b, c, d] with five numbers; others are skipped.
std::vector<std::pair<int64_t, cv::Rect2d>> box_rows(const nlohmann::json& rows) {
  std::vector<std::pair<int64_t, cv::Rect2d>> out;
  if (!rows.is_array()) return out;
  for (const auto& row : rows) {
    if (!row.is_array() || row.size() < 5) continue;
    bool numeric = true;
    for (size_t i = 0; i < 5; ++i) numeric = numeric && row[i].is_number();
    if (!numeric) continue;
    const cv::Rect2d r(row[1].get<double>(), row[2].get<double>(), row[3].get<double>(),
                       row[4].get<double>());
    if (!(r.width > 0 && r.height > 0) || !std::isfinite(r.x + r.y + r.width + r.height)) continue;
    out.emplace_back(row[0].get<int64_t>(), r);
  }
  return out;
}

cv::Rect to_pixels(const cv::Rect2d& r) {
  const int x = static_cast<int>(std::lround(r.x)), y = static_cast<int>(std::lround(r.y));
  return {x, y, std::max(1, static_cast<int>(std::lround(r.x + r.width)) - x),
          std::max(1, static_cast<int>(std::lround(r.y + r.height)) - y)};
}

}  // namespace

std::vector<ObjectBox> object_boxes(const TrackedObject& object, cv::Size frame_size) {
  std::vector<ObjectBox> out;
  const auto frac = object.detail.find("boxes_frac");
  const bool use_frac =
      frac != object.detail.end() && frame_size.area() > 0 && !box_rows(*frac).empty();
  const auto px = object.detail.find("boxes");
  if (use_frac) {
    for (const auto& [frame, r] : box_rows(*frac))
      out.push_back({frame, to_pixels({r.x * frame_size.width, r.y * frame_size.height,
                                       r.width * frame_size.width, r.height * frame_size.height})});
  } else if (px != object.detail.end()) {
    for (const auto& [frame, r] : box_rows(*px)) out.push_back({frame, to_pixels(r)});
  }
  std::stable_sort(out.begin(), out.end(),
                   [](const auto& a, const auto& b) { return a.frame < b.frame; });
  return out;
}

std::optional<cv::Rect> object_box_at(const TrackedObject& object, int64_t frame,
                                      cv::Size frame_size) {
  if (frame < object.first_frame || frame > object.last_frame) return std::nullopt;
  std::optional<cv::Rect> found;
  for (const auto& b : object_boxes(object, frame_size)) {
    if (b.frame > frame) break;
    found = b.box_px;
  }
  return found;
}

std::optional<ObjectBox> object_first_box(const TrackedObject& object, cv::Size frame_size) {
  auto boxes = object_boxes(object, frame_size);
  if (boxes.empty()) return std::nullopt;
  return boxes.front();
}

std::vector<std::pair<int64_t, double>> object_drift_samples(const TrackedObject& object) {
  std::vector<std::pair<int64_t, double>> out;
  const auto drift = object.detail.find("drift");
  if (drift == object.detail.end() || !drift->is_array()) return out;
  const auto frames = object.detail.find("frames");
  const bool aligned =
      frames != object.detail.end() && frames->is_array() && frames->size() == drift->size();
  for (size_t i = 0; i < drift->size(); ++i) {
    const auto& entry = (*drift)[i];
    if (entry.is_array() && entry.size() >= 2 && entry[0].is_number() && entry[1].is_number()) {
      out.emplace_back(entry[0].get<int64_t>(), entry[1].get<double>());
    } else if (entry.is_number()) {
      const int64_t frame = aligned && (*frames)[i].is_number() ? (*frames)[i].get<int64_t>()
                                                                : object.first_frame + int64_t(i);
      out.emplace_back(frame, entry.get<double>());
    }
  }
  std::stable_sort(out.begin(), out.end(),
                   [](const auto& a, const auto& b) { return a.first < b.first; });
  return out;
}

std::optional<double> object_drift_at(const TrackedObject& object, int64_t frame) {
  std::optional<double> found;
  for (const auto& [f, v] : object_drift_samples(object)) {
    if (f > frame) break;
    if (std::isfinite(v)) found = v;
  }
  return found;
}

std::vector<const TrackedObject*> objects_at_frame(const Report& report, int64_t frame,
                                                   cv::Size frame_size, size_t max_count) {
  std::vector<std::pair<double, const TrackedObject*>> ranked;
  for (const auto& object : report.objects) {
    if (!object_box_at(object, frame, frame_size)) continue;
    ranked.emplace_back(object_drift_at(object, frame).value_or(-1.0), &object);
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

}  // namespace clipwarden
