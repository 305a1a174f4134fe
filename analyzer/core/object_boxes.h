// Boxes and drift of tracked objects (Report::objects) at a frame, for the
// pictures: each look's box in working-frame pixels or as fractions of the
// frame, and its drift. Looks without a usable box (unknown or empty) are
// passed over: a report read from disk must never crash the page writer.
#pragma once

#include <cstdint>
#include <optional>
#include <vector>

#include <opencv2/core.hpp>

#include "clipwarden/report.h"

namespace clipwarden {

struct ObjectBox {
  int64_t frame = 0;
  cv::Rect box_px;
};

// The object's boxes in pixels of a frame of `frame_size` (the working
// size the pictures are made at): from the fractions when present, so a page
// made at another size still boxes the right place; else from the pixels.
std::vector<ObjectBox> object_boxes(const TrackedObject& object, cv::Size frame_size);

// The box at `frame`, or the last one before it within the object's life.
std::optional<cv::Rect> object_box_at(const TrackedObject& object, int64_t frame,
                                      cv::Size frame_size);

// The object's first box (its "first look").
std::optional<ObjectBox> object_first_box(const TrackedObject& object, cv::Size frame_size);

// The object's drift at `frame` (the last known look at or before it).
std::optional<double> object_drift_at(const TrackedObject& object, int64_t frame);

// The object's sampled (frame, drift) pairs, for its sparkline.
std::vector<std::pair<int64_t, double>> object_drift_samples(const TrackedObject& object);

// Objects shown at a drift panel: alive at `frame` with a box, largest drift
// first (when known), at most `max_count`.
std::vector<const TrackedObject*> objects_at_frame(const Report& report, int64_t frame,
                                                   cv::Size frame_size, size_t max_count);

}  // namespace clipwarden
