// Building a FramePair: optical flow both ways (OpenCV DIS), the occlusion
// mask by the forward-backward check, the previous frame warped onto the
// current one, and the camera motion fit. Used by the pipeline for every
// pair and by `inspect` / the HTML panels for single frames.
#pragma once

#include <memory>

#include "analyzer/frame/frame_pair.h"
#include "clipwarden/analysis.h"

namespace clipwarden {

// Fills the per-frame planes (gray, luminance) of a decoded frame.
void prepare_planes(int64_t index, double t_s, const cv::Mat& bgr, FramePlanes& planes);
// The same in two steps, for a caller that decides from the gray plane
// whether the frame is analysed at all (the cadence filter): the frame's
// number, time, BGR and gray first, its luminance once it is analysed.
void prepare_gray(int64_t index, double t_s, const cv::Mat& bgr, FramePlanes& planes);
void prepare_luminance(FramePlanes& planes);

// One per worker thread: owns the DIS instance and scratch buffers, so
// building pairs allocates nothing in the steady state.
class PairBuilder {
 public:
  explicit PairBuilder(Preset preset);
  ~PairBuilder();
  PairBuilder(const PairBuilder&) = delete;
  PairBuilder& operator=(const PairBuilder&) = delete;

  // Computes everything in `pair` for (prev, cur); pair.prev/cur point at them.
  void build(const FramePlanes& prev, const FramePlanes& cur, FramePair& pair);

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

}  // namespace clipwarden
