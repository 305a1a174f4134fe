#include "analyzer/decode/frame_scaler.h"

#include <algorithm>
#include <cmath>

#include <opencv2/core.hpp>

extern "C" {
#include <libavutil/pixdesc.h>
}

namespace framelint::decode {
namespace {

// Source pixel formats whose full range is implied by the format itself.
bool is_jpeg_range_format(int format) {
  return format == AV_PIX_FMT_YUVJ420P || format == AV_PIX_FMT_YUVJ422P ||
         format == AV_PIX_FMT_YUVJ444P || format == AV_PIX_FMT_YUVJ440P ||
         format == AV_PIX_FMT_YUVJ411P;
}

// The YUV matrix to decode with. Untagged streams: BT.709 for HD and up,
// BT.601 below (common practice in players; FFmpeg's own default is BT.601
// for every size, which shifts HD colours slightly).
int matrix_for(const AVFrame& frame) {
  if (frame.colorspace != AVCOL_SPC_UNSPECIFIED && frame.colorspace != AVCOL_SPC_RESERVED)
    return frame.colorspace;
  return frame.height >= 720 ? AVCOL_SPC_BT709 : AVCOL_SPC_SMPTE170M;
}

}  // namespace

cv::Size working_size(int width, int height, int long_side_px) {
  if (width <= 0 || height <= 0) return {0, 0};
  if (long_side_px <= 0) return {width, height};
  const double scale = static_cast<double>(long_side_px) / std::max(width, height);
  const int w = width >= height ? long_side_px : std::max(1, static_cast<int>(std::lround(width * scale)));
  const int h = height > width ? long_side_px : std::max(1, static_cast<int>(std::lround(height * scale)));
  return {w, h};
}

int display_width(int stored_width, int sar_num, int sar_den) {
  if (sar_num <= 0 || sar_den <= 0 || sar_num == sar_den) return stored_width;
  return std::max(1, static_cast<int>(std::lround(static_cast<double>(stored_width) * sar_num / sar_den)));
}

void prepare_bgr(cv::Mat& mat, int rows, int cols) {
  if (mat.u && mat.u->refcount > 1) mat.release();
  mat.create(rows, cols, CV_8UC3);
}

bool FrameScaler::ensure_context(const AVFrame& frame) {
  const int range = is_jpeg_range_format(frame.format) ? AVCOL_RANGE_JPEG : frame.color_range;
  const int matrix = matrix_for(frame);
  if (sws_ && frame.width == src_width_ && frame.height == src_height_ &&
      frame.format == src_format_ && matrix == src_colorspace_ && range == src_range_)
    return true;
  const bool quarter_turn = rotation_cw_ == 90 || rotation_cw_ == 270;
  const int out_w = quarter_turn ? output_.height : output_.width;
  const int out_h = quarter_turn ? output_.width : output_.height;
  const bool shrinking = out_w <= frame.width && out_h <= frame.height &&
                         (out_w < frame.width || out_h < frame.height);
  // Accurate rounding keeps colours exact to about one code value. Full
  // chroma interpolation only pays when the chroma plane is enlarged (output
  // wider than half the source); when shrinking further it costs ~25 % more
  // scaling time for no visible change.
  int flags = (shrinking ? SWS_AREA : SWS_BICUBIC) | SWS_ACCURATE_RND;
  if (2 * out_w > frame.width) flags |= SWS_FULL_CHR_H_INT;
  sws_.reset(sws_getContext(frame.width, frame.height, static_cast<AVPixelFormat>(frame.format),
                            out_w, out_h, AV_PIX_FMT_BGR24, flags, nullptr, nullptr, nullptr));
  if (!sws_) return false;
  // Decode with the stream's own matrix and range into full-range RGB.
  const int* coefficients = sws_getCoefficients(matrix);
  sws_setColorspaceDetails(sws_.get(), coefficients, range == AVCOL_RANGE_JPEG ? 1 : 0,
                           sws_getCoefficients(SWS_CS_DEFAULT), 1, 0, 1 << 16, 1 << 16);
  src_width_ = frame.width;
  src_height_ = frame.height;
  src_format_ = frame.format;
  src_colorspace_ = matrix;
  src_range_ = range;
  return true;
}

Status FrameScaler::convert(const AVFrame& frame, cv::Mat& bgr, const std::string& path) {
  if (!ensure_context(frame)) {
    const char* name = av_get_pix_fmt_name(static_cast<AVPixelFormat>(frame.format));
    return input_error(path, std::string("cannot convert pixel format ") + (name ? name : "unknown") +
                                 " to BGR");
  }
  const bool quarter_turn = rotation_cw_ == 90 || rotation_cw_ == 270;
  cv::Mat& target = rotation_cw_ == 0 ? bgr : unrotated_;
  prepare_bgr(target, quarter_turn ? output_.width : output_.height,
              quarter_turn ? output_.height : output_.width);
  if (rotation_cw_ != 0) prepare_bgr(bgr, output_.height, output_.width);
  uint8_t* planes[4] = {target.data, nullptr, nullptr, nullptr};
  int strides[4] = {static_cast<int>(target.step[0]), 0, 0, 0};
  sws_scale(sws_.get(), frame.data, frame.linesize, 0, frame.height, planes, strides);
  if (rotation_cw_ == 90) cv::rotate(unrotated_, bgr, cv::ROTATE_90_CLOCKWISE);
  if (rotation_cw_ == 180) cv::rotate(unrotated_, bgr, cv::ROTATE_180);
  if (rotation_cw_ == 270) cv::rotate(unrotated_, bgr, cv::ROTATE_90_COUNTERCLOCKWISE);
  return Ok{};
}

}  // namespace framelint::decode
