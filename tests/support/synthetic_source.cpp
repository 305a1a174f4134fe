#include "support/synthetic_source.h"

#include <opencv2/imgproc.hpp>

namespace clipwarden::fixtures {

SyntheticSource::SyntheticSource(int64_t frames, double fps, FrameMaker make) : fps_(fps), make_(std::move(make)) {
  const cv::Mat first = make_(0);
  info_.path = "synthetic";
  info_.container = "memory";
  info_.codec = "rawvideo";
  info_.width = first.cols;
  info_.height = first.rows;
  info_.fps = fps;
  info_.frame_count = frames;
  info_.duration_s = frames / fps;
  info_.pix_fmt = "bgr24";
}

Expected<FrameRead> SyntheticSource::read(DecodedFrame& frame) {
  if (next_ >= info_.frame_count) return FrameRead::end_of_clip;
  frame.index = next_;
  frame.t_s = next_ / fps_;
  frame.bgr = make_(next_);
  ++next_;
  return FrameRead::frame;
}

StreamFacts SyntheticSource::stream_facts() const {
  StreamFacts s;
  s.video_duration_s = info_.duration_s;
  return s;
}

cv::Mat smooth_texture(cv::Size size, uint64_t seed) {
  cv::RNG rng(seed);
  cv::Mat noise(size, CV_8UC3);
  rng.fill(noise, cv::RNG::UNIFORM, 0, 256);
  cv::Mat smooth;
  cv::GaussianBlur(noise, smooth, cv::Size(0, 0), 2.0);
  cv::normalize(smooth, smooth, 20, 235, cv::NORM_MINMAX);
  return smooth;
}

cv::Mat view(const cv::Mat& texture, double x, double y, cv::Size size) {
  cv::Mat m = (cv::Mat_<double>(2, 3) << 1, 0, -x, 0, 1, -y);
  cv::Mat out;
  cv::warpAffine(texture, out, m, size, cv::INTER_LINEAR, cv::BORDER_REFLECT);
  return out;
}

}  // namespace clipwarden::fixtures
