// A frame on its way out of the cadence filter (cadence_filter.h). While
// the filter decides a clip's cadence it holds every frame from the first
// stored repeat on, up to 30 of them. A stored repeat is, by the filter's
// own test, (almost) the picture before it, so it is held as the bytes
// where its planes differ from the last frame held in full (for a GIF's
// repeats: none at all) and rebuilt only when it is handed on; most are
// never rebuilt, since the cadence leaves them out. At 512x512 a frame's
// BGR and grey planes are 1 MB, and a GIF storing each picture 3 times held
// 29 of them before its first pair could start.
#pragma once

#include <cstdint>
#include <functional>
#include <memory>
#include <vector>

#include "analyzer/frame/frame_pair.h"

namespace clipwarden {

// The bytes where a plane differs from a base plane of the same size and type.
struct PlaneDifference {
  std::vector<uint32_t> offsets;  // byte offsets into the plane's data, ascending
  std::vector<uint8_t> values;    // the plane's bytes there
  size_t bytes() const { return offsets.size() * sizeof(uint32_t) + values.size(); }
};

// The difference of `plane` from `base`, or false when it would not be
// smaller than a quarter of the plane (then the plane is kept whole). Two
// empty planes differ nowhere.
bool sparse_difference(const cv::Mat& plane, const cv::Mat& base, PlaneDifference& out);
// `base` with the difference applied, written into `out` (its buffer is
// reused when it has the size and type).
void apply_difference(const cv::Mat& base, const PlaneDifference& difference, cv::Mat& out);

class HeldFrame {
 public:
  using Frame = std::shared_ptr<FramePlanes>;

  explicit HeldFrame(Frame full);
  // `repeat` as its difference from `base` (its planes are let go), or in
  // full when too many bytes differ; in_full() says which.
  static HeldFrame repeat_of(Frame repeat, std::shared_ptr<const FramePlanes> base);

  int64_t index() const { return index_; }
  void renumber(int64_t index);
  bool in_full() const { return full_ != nullptr; }
  // Bytes this frame keeps of its own: its planes, or its differences.
  size_t held_bytes() const;

  // The frame's planes. One held as a difference is rebuilt into a frame
  // from `spare` (any earlier content; its buffers are reused), its
  // luminance plane left as it was.
  Frame take(const std::function<Frame()>& spare);

 private:
  HeldFrame() = default;
  Frame full_;
  std::shared_ptr<const FramePlanes> base_;
  PlaneDifference bgr_, gray_;
  int64_t index_ = 0;
  double t_s_ = 0;
};

}  // namespace clipwarden
