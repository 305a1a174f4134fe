// Frames from Python for the library's frame feed (clipwarden/frame_feed.h):
// a T x H x W x 3 NumPy array or any iterable of H x W x 3 frames, taken one
// at a time. Each step holds the GIL only to take the next frame and copy it
// out; the copy is what the analysis scales, so the caller's array may be
// reused or freed at once.
#pragma once

#include <memory>
#include <string>

#include "analyzer/python/binding.h"
#include "clipwarden/frame_feed.h"

namespace clipwarden::python {

class FrameIterator {
 public:
  // Checks an array's shape and dtype at once (UsageError); other objects
  // must be iterable (TypeError).
  FrameIterator(const py::object& frames, const std::string& name);

  // Frames announced by an array's first axis, else 0.
  int64_t known_count() const { return known_count_; }
  // The feed; it keeps this iterator's state alive. Destroy it holding the GIL.
  FrameFeed feed() const;
  // Raises the exception the Python iterator raised, if any.
  void rethrow() const;

 private:
  struct State;
  std::shared_ptr<State> state_;
  int64_t known_count_ = 0;
};

}  // namespace clipwarden::python
