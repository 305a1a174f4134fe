// Decoding on its own thread: frames are read, their planes prepared (grey,
// luminance), and handed on through a bounded queue.
#pragma once

#include <memory>
#include <optional>
#include <thread>

#include "analyzer/frame/frame_pair.h"
#include "analyzer/pipeline/bounded_queue.h"
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

 private:
  void run();
  ClipSource& source_;
  BoundedQueue<std::shared_ptr<const FramePlanes>> queue_;
  std::shared_ptr<PlanesPool> pool_;
  std::optional<Error> error_;
  double busy_ms_ = 0;
  std::thread thread_;
};

}  // namespace clipwarden
