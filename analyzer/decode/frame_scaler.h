// Turning decoded pictures into analysis frames: one scaling pass, in
// colour, to BGR 8-bit at the working size, then the display rotation.
#pragma once

#include <vector>

#include <opencv2/core.hpp>

#include "analyzer/decode/libav_util.h"

namespace clipwarden::decode {

// Size of the analysis frame for a displayed picture of width x height:
// the long side becomes long_side_px (0 keeps the native size) and the
// short side follows the aspect ratio, rounded, at least 1 px. Odd results
// are kept (no rounding to even sizes).
cv::Size working_size(int width, int height, int long_side_px);

// Displayed width of a picture whose pixels are not square: the stored
// width times the sample aspect ratio, rounded (unchanged when num/den is
// unknown or 1:1).
int display_width(int stored_width, int sar_num, int sar_den);

// Converts AVFrames of any pixel format (8/10/12-bit YUV, RGB, palette,
// grey) to BGR24 at a fixed output size, reusing its libswscale contexts
// and buffers from frame to frame. Filter: area averaging when shrinking
// (each output pixel is the mean of the input pixels it covers), bicubic
// otherwise. Subsampled YUV goes through 4:4:4 at the output size first
// (see frame_scaler.cpp for why).
// Makes `mat` a rows x cols CV_8UC3 matrix that no other Mat shares,
// reusing its buffer when possible.
void prepare_bgr(cv::Mat& mat, int rows, int cols);

class FrameScaler {
 public:
  // output: displayed (post-rotation) size; rotation_cw: 0, 90, 180, 270.
  FrameScaler(cv::Size output, int rotation_cw) : output_(output), rotation_cw_(rotation_cw) {}

  // Scales `frame` into `bgr`. bgr's buffer is reused when it has the right
  // size and type and nobody else holds it; a buffer shared with another Mat
  // (e.g. a frame the caller kept) is left alone and a new one allocated.
  Status convert(const AVFrame& frame, cv::Mat& bgr, const std::string& path);

 private:
  bool ensure_context(const AVFrame& frame);

  cv::Size output_;
  int rotation_cw_;
  SwsPtr to_444_;  // subsampled YUV only: to 4:4:4 at the output size
  SwsPtr to_bgr_;  // to BGR24 (from the source, or from the 4:4:4 planes)
  std::vector<uint8_t> planes_444_;
  int plane_stride_ = 0;
  int src_width_ = 0, src_height_ = 0, src_format_ = -1, src_colorspace_ = -1, src_range_ = -1;
  cv::Mat unrotated_;  // scaling target when a rotation follows
};

}  // namespace clipwarden::decode
