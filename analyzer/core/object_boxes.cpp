#include "analyzer/core/object_boxes.h"

#include <algorithm>
#include <cmath>

namespace clipwarden {
namespace {

bool usable(const BoxValues& b) {
  return b.width > 0 && b.height > 0 && std::isfinite(b.x + b.y + b.width + b.height);
}

cv::Rect to_pixels(const BoxValues& r) {
  const int x = static_cast<int>(std::lround(r.x)), y = static_cast<int>(std::lround(r.y));
  return {x, y, std::max(1, static_cast<int>(std::lround(r.x + r.width)) - x),
          std::max(1, static_cast<int>(std::lround(r.y + r.height)) - y)};
}

}  // namespace

std::vector<ObjectBox> object_boxes(const TrackedObject& object, cv::Size frame_size) {
  std::vector<ObjectBox> out;
  const bool use_frac =
      frame_size.area() > 0 && std::any_of(object.samples.begin(), object.samples.end(),
                                            [](const TrackedSample& l) { return usable(l.box_frac); });
  for (const auto& look : object.samples) {
    if (use_frac && usable(look.box_frac)) {
      const BoxValues& f = look.box_frac;
      out.push_back({look.frame, to_pixels({f.x * frame_size.width, f.y * frame_size.height,
                                            f.width * frame_size.width, f.height * frame_size.height})});
    } else if (!use_frac && usable(look.box_px)) {
      out.push_back({look.frame, to_pixels(look.box_px)});
    }
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
  for (const auto& look : object.samples)
    if (std::isfinite(look.drift)) out.emplace_back(look.frame, look.drift);
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
