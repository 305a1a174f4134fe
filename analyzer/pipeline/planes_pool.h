// Recycled frame planes: a frame's buffers (BGR, grey, luminance) go back to
// the pool when the last pair using the frame is done with it, and the
// decoder thread fills them again, so the steady state allocates nothing.
// The pool lives as long as any frame it handed out (the frames keep it).
#pragma once

#include <atomic>
#include <memory>
#include <mutex>
#include <vector>

#include "analyzer/frame/frame_pair.h"

namespace clipwarden {

class PlanesPool : public std::enable_shared_from_this<PlanesPool> {
 public:
  static std::shared_ptr<PlanesPool> create() { return std::shared_ptr<PlanesPool>(new PlanesPool()); }

  // A frame whose buffers may hold an earlier frame's pixels (same size).
  std::shared_ptr<FramePlanes> take() {
    std::unique_ptr<FramePlanes> planes;
    {
      std::lock_guard lock(mutex_);
      if (!spare_.empty()) {
        planes = std::move(spare_.back());
        spare_.pop_back();
      }
    }
    if (!planes) {
      planes = std::make_unique<FramePlanes>();
      created_.fetch_add(1, std::memory_order_relaxed);
    }
    std::shared_ptr<PlanesPool> self = shared_from_this();
    return std::shared_ptr<FramePlanes>(planes.release(), [self](FramePlanes* p) { self->give_back(p); });
  }

  // Frames made so far: the most that were ever out of the pool at once.
  size_t created() const { return created_.load(std::memory_order_relaxed); }

 private:
  PlanesPool() = default;
  void give_back(FramePlanes* planes) {
    std::lock_guard lock(mutex_);
    spare_.emplace_back(planes);
  }

  std::mutex mutex_;
  std::vector<std::unique_ptr<FramePlanes>> spare_;
  std::atomic<size_t> created_{0};
};

}  // namespace clipwarden
