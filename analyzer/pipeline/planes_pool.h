// Recycled frame planes: a frame's buffers (BGR, grey, luminance) go back to
// the pool when the last pair using the frame is done with it, and the
// decoder thread fills them again, so the steady state allocates nothing.
// The pool lives as long as any frame it handed out (the frames keep it).
// It keeps at most a few spare frames: more are only left over from a
// moment that needed more (the cadence filter's hold), and their memory is
// worth more to the metrics than to the pool.
#pragma once

#include <algorithm>
#include <memory>
#include <mutex>
#include <vector>

#include "analyzer/frame/frame_pair.h"

namespace clipwarden {

class PlanesPool : public std::enable_shared_from_this<PlanesPool> {
 public:
  static std::shared_ptr<PlanesPool> create() {
    return std::shared_ptr<PlanesPool>(new PlanesPool());
  }

  // A frame whose buffers may hold an earlier frame's pixels (same size).
  std::shared_ptr<FramePlanes> take() {
    std::unique_ptr<FramePlanes> planes;
    {
      std::lock_guard lock(mutex_);
      if (!spare_.empty()) {
        planes = std::move(spare_.back());
        spare_.pop_back();
      }
      peak_out_ = std::max(peak_out_, ++out_);
    }
    if (!planes) planes = std::make_unique<FramePlanes>();
    std::shared_ptr<PlanesPool> self = shared_from_this();
    return std::shared_ptr<FramePlanes>(planes.release(),
                                        [self](FramePlanes* p) { self->give_back(p); });
  }

  // The most frames that were out of the pool at once so far.
  size_t peak_out() const {
    std::lock_guard lock(mutex_);
    return peak_out_;
  }

  size_t spares() const {
    std::lock_guard lock(mutex_);
    return spare_.size();
  }

  // Spare frames kept: the decoder takes one frame per frame and a commit
  // gives one back, so a steady stream needs one or two.
  static constexpr size_t kMaxSpare = 2;

 private:
  PlanesPool() = default;
  void give_back(FramePlanes* planes) {
    std::unique_ptr<FramePlanes> owned(planes);
    std::lock_guard lock(mutex_);
    --out_;
    if (spare_.size() < kMaxSpare) spare_.push_back(std::move(owned));
  }

  mutable std::mutex mutex_;
  std::vector<std::unique_ptr<FramePlanes>> spare_;
  size_t out_ = 0, peak_out_ = 0;
};

}  // namespace clipwarden
