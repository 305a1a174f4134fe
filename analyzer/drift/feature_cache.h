// Frame features computed ahead of the in-order tracker. The features of a
// frame depend on its pixels only, so the concurrent per-pair stage
// (Metric::measure_pair) computes them for each pair's current frame and
// the serial tracker (DriftTracker::step) picks them up by frame index,
// instead of computing them itself on the serial path; likewise the pair's
// gray-histogram distance for the cut test. Buffers are recycled: the
// steady state allocates nothing.
#pragma once

#include <cstdint>
#include <mutex>
#include <vector>

#include <opencv2/core.hpp>

#include "analyzer/drift/frame_features.h"

namespace framelint::drift {

class FeatureCache {
 public:
  // Computes and keeps the features of one frame, with the histogram
  // distance of the pair that ends on it (NaN if not computed).
  // Thread-safe.
  void prepare(int64_t frame_index, const cv::Mat& gray, const cv::Mat& bgr, int window_radius,
               double cut_distance);

  // Moves the features of `frame_index` into `into` (its old buffers are
  // kept for reuse), sets `cut_distance` and returns true; false if they
  // were not prepared. Features of earlier frames, never to be asked for,
  // are dropped.
  bool take(int64_t frame_index, FrameFeatures& into, double& cut_distance);

 private:
  struct Entry {
    FrameFeatures features;
    double cut_distance = 0;
  };
  std::mutex mutex_;
  std::vector<Entry> ready_;  // a few at most: the pairs in flight
  std::vector<FrameFeatures> spare_;
};

}  // namespace framelint::drift
