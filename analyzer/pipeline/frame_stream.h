// Decoding on its own thread: frames are read, their planes prepared (grey,
// luminance), stored repeats that the clip's cadence explains are left out
// (cadence_filter.h), and the rest handed on through a bounded queue,
// numbered in analysis order.
#pragma once

#include <memory>
#include <optional>
#include <thread>

#include "analyzer/frame/frame_pair.h"
#include "analyzer/pipeline/bounded_queue.h"
#include "analyzer/pipeline/cadence_filter.h"
#include "analyzer/pipeline/planes_pool.h"
#include "clipwarden/clip_source.h"

namespace clipwarden {

class FrameStream {
 public:
  // Starts reading at once. `capacity` bounds the frames held in the queue.
  FrameStream(ClipSource& source, size_t capacity);
  ~FrameStream();  // stops and joins the thread
  FrameStream(const FrameStream&) = delete;
  FrameStream& operator=(const FrameStream&) = delete;

  // The next frame's planes, or nullptr at the end (then check error()).
  std::shared_ptr<const FramePlanes> next();
  // Set if decoding stopped on a corrupt input rather than at the end.
  const std::optional<Error>& error() const { return error_; }
  // Time the decoder thread spent working (not waiting), after the end.
  double busy_ms() const { return busy_ms_; }
  // After the end: the cadence found (cadence_filter.h) and the decoded
  // index of every frame handed on.
  const CadenceFilter& cadence() const { return cadence_; }
  // The most decoded frames alive at once so far (planes_pool.h).
  size_t frames_held_peak() const { return pool_->peak_out(); }

 private:
  void run();
  ClipSource& source_;
  BoundedQueue<std::shared_ptr<const FramePlanes>> queue_;
  std::shared_ptr<PlanesPool> pool_;
  std::optional<Error> error_;
  CadenceFilter cadence_;
  double busy_ms_ = 0;
  std::thread thread_;
};

}  // namespace clipwarden
