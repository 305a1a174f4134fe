// A ClipSource over frames made in memory, for tests of the pipeline that
// need no decoder. Invented pictures: only the plumbing and the metrics'
// response to a known change are under test.
#pragma once

#include <functional>

#include "clipwarden/clip_source.h"

namespace clipwarden::fixtures {

using FrameMaker = std::function<cv::Mat(int64_t index)>;  // CV_8UC3

class SyntheticSource final : public ClipSource {
 public:
  SyntheticSource(int64_t frames, double fps, FrameMaker make);
  const ClipInfo& info() const override { return info_; }
  Expected<FrameRead> read(DecodedFrame& frame) override;
  StreamFacts stream_facts() const override;

 private:
  ClipInfo info_;
  int64_t next_ = 0;
  double fps_;
  FrameMaker make_;
};

// A smooth random texture (seeded), larger than the frame, to pan across.
cv::Mat smooth_texture(cv::Size size, uint64_t seed);

// The window of `texture` at (x, y) of the given size, with sub-pixel shift.
cv::Mat view(const cv::Mat& texture, double x, double y, cv::Size size);

}  // namespace clipwarden::fixtures
