// Everything the per-pair stage computes for frames t-1 and t, in frame t's
// coordinates, shared read-only by every metric.
#pragma once

#include <cstdint>
#include <memory>
#include <typeindex>
#include <utility>
#include <vector>

#include <opencv2/core.hpp>
#include <opencv2/core/matx.hpp>

namespace clipwarden {

// Per-frame planes prepared once per decoded frame.
struct FramePlanes {
  int64_t index = 0;
  double t_s = 0;
  cv::Mat bgr;        // CV_8UC3, working size
  cv::Mat gray;       // CV_8UC1, for optical flow
  cv::Mat luminance;  // CV_32FC1, relative luminance Y in [0,1] (sRGB -> linear, BT.709)
};

// Per-pair data a metric computes in measure_pair (on a worker, concurrently
// with other pairs) for its own observe_in_order of the same pair (serial,
// in frame order), so per-pixel work can leave the serial stage. A metric
// finds its slot by its own address: slot<T>(this) creates a T on first use
// (keyed by owner and type) and returns the same object afterwards. Thread safety comes from the
// pipeline's order: all measure_pair calls of a pair run on one thread,
// and observe_in_order runs after them. The pipeline reuses FramePair
// objects, so slots (and their buffers) are reused; a slot may therefore
// hold data of an earlier pair, or none if measure_pair was not called, and
// a reader must check which frame it holds and recompute if need be.
class PairScratch {
 public:
  template <class T>
  T& slot(const void* owner) const {
    for (Slot& s : slots_)
      if (s.owner == owner && s.type == std::type_index(typeid(T))) return *static_cast<T*>(s.data.get());
    auto data = std::make_shared<T>();
    T& out = *data;
    slots_.push_back({owner, std::type_index(typeid(T)), std::move(data)});
    return out;
  }

 private:
  struct Slot {
    const void* owner;
    std::type_index type;
    std::shared_ptr<void> data;
  };
  mutable std::vector<Slot> slots_;
};

struct FramePair {
  const FramePlanes* prev = nullptr;
  const FramePlanes* cur = nullptr;
  double dt_s = 0;             // cur.t_s - prev.t_s
  cv::Mat flow_backward;       // CV_32FC2: cur pixel x -> prev at x + flow_backward(x)
  cv::Mat flow_forward;        // CV_32FC2: prev pixel y -> cur at y + flow_forward(y)
  cv::Mat valid;               // CV_8UC1: 255 where the forward-backward check passes
  cv::Mat warped_prev_bgr;     // CV_8UC3: prev warped onto cur by flow_backward
  cv::Mat warped_prev_luminance;  // CV_32FC1
  double valid_fraction = 0;   // share of pixels where `valid` is set

  // Dominant (camera) motion from prev to cur: a homography fitted robustly
  // (RANSAC) to flow samples on valid, textured pixels (analyzer/flow/
  // camera_motion.*). Maps prev pixel coordinates to cur coordinates.
  // Identity with camera_inlier_fraction = 0 when no fit was possible.
  cv::Matx33d camera_homography = cv::Matx33d::eye();
  double camera_inlier_fraction = 0;

  // Metrics' own per-pair data (PairScratch above).
  PairScratch scratch;
};

}  // namespace clipwarden
