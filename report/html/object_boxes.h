// Reading tracked objects' boxes from Report::objects (detail.boxes holds
// [frame, x, y, w, h] rows in working-frame pixels, written by the drift
// metric), tolerant of missing or malformed entries: a report read from
// disk must never crash the page writer.
#pragma once

#include <cstdint>
#include <optional>
#include <vector>

#include <opencv2/core.hpp>

#include "framelint/report.h"

namespace framelint {

struct ObjectBox {
  int64_t frame = 0;
  cv::Rect box_px;
};

std::vector<ObjectBox> object_boxes(const TrackedObject& object);

// The box at `frame`, or the last one before it within the object's life.
std::optional<cv::Rect> object_box_at(const TrackedObject& object, int64_t frame);

// The object's first box (its "first look").
std::optional<ObjectBox> object_first_box(const TrackedObject& object);

// The object's drift value at `frame` when its detail carries a per-frame
// series (detail.drift as [frame, value] rows or as values from first_frame).
std::optional<double> object_drift_at(const TrackedObject& object, int64_t frame);

// Objects shown at a drift panel: alive at `frame` with a box, largest drift
// first (when known), at most `max_count`.
std::vector<const TrackedObject*> objects_at_frame(const Report& report, int64_t frame,
                                                   size_t max_count);

}  // namespace framelint
