#include "analyzer/drift/feature_cache.h"

#include <algorithm>
#include <utility>

namespace framelint::drift {
namespace {

// More spare buffers than pairs in flight are never needed.
constexpr size_t kMaxSpare = 8;

}  // namespace

void FeatureCache::prepare(int64_t frame_index, const cv::Mat& gray, const cv::Mat& bgr,
                           int window_radius, double cut_distance) {
  FrameFeatures features;
  {
    std::lock_guard lock(mutex_);
    if (!spare_.empty()) {
      features = std::move(spare_.back());
      spare_.pop_back();
    }
  }
  features.compute(frame_index, gray, bgr, window_radius);
  std::lock_guard lock(mutex_);
  ready_.push_back(Entry{std::move(features), cut_distance});
}

bool FeatureCache::take(int64_t frame_index, FrameFeatures& into, double& cut_distance) {
  std::lock_guard lock(mutex_);
  bool found = false;
  for (auto it = ready_.begin(); it != ready_.end();) {
    if (it->features.frame_index() > frame_index) {
      ++it;
      continue;
    }
    if (it->features.frame_index() == frame_index && !found) {
      std::swap(into, it->features);
      cut_distance = it->cut_distance;
      found = true;
    }
    if (spare_.size() < kMaxSpare) spare_.push_back(std::move(it->features));
    it = ready_.erase(it);
  }
  return found;
}

}  // namespace framelint::drift
