#include "analyzer/decode/frame_scaler.h"

#include <algorithm>
#include <cmath>

#include <opencv2/core.hpp>

extern "C" {
#include <libavutil/pixdesc.h>
}

namespace clipwarden::decode {
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
  const int w =
      width >= height ? long_side_px : std::max(1, static_cast<int>(std::lround(width * scale)));
  const int h =
      height > width ? long_side_px : std::max(1, static_cast<int>(std::lround(height * scale)));
  return {w, h};
}

int display_width(int stored_width, int sar_num, int sar_den) {
  if (sar_num <= 0 || sar_den <= 0 || sar_num == sar_den) return stored_width;
  return std::max(
      1, static_cast<int>(std::lround(static_cast<double>(stored_width) * sar_num / sar_den)));
}

void prepare_bgr(cv::Mat& mat, int rows, int cols) {
  if (mat.u && mat.u->refcount > 1) mat.release();
  mat.create(rows, cols, CV_8UC3);
}

// Why two passes for subsampled YUV: libswscale's direct YUV 4:2:0 -> RGB
// output at a reduced size interpolates chroma coarsely unless told to
// upsample it fully (SWS_FULL_CHR_H_INT), and measured against an area
// average of the full-size RGB picture it is off by 3-5 levels on average
// with a 1.6-level green bias (testsrc2/mandelbrot clips). Scaling luma and
// chroma to a 4:4:4 picture at the working size first, then converting that
// picture without scaling, is as accurate as the full-chroma path (about 1
// level) at half its extra cost (1080p -> 512 px: +0.3 s vs +0.6 s of CPU
// per 240 frames over decoding alone, which takes ~1.5 s).
bool FrameScaler::ensure_context(const AVFrame& frame) {
  const int range = is_jpeg_range_format(frame.format) ? AVCOL_RANGE_JPEG : frame.color_range;
  const int matrix = matrix_for(frame);
  if (to_bgr_ && frame.width == src_width_ && frame.height == src_height_ &&
      frame.format == src_format_ && matrix == src_colorspace_ && range == src_range_)
    return true;
  const bool quarter_turn = rotation_cw_ == 90 || rotation_cw_ == 270;
  const int out_w = quarter_turn ? output_.height : output_.width;
  const int out_h = quarter_turn ? output_.width : output_.height;
  const bool shrinking = out_w <= frame.width && out_h <= frame.height &&
                         (out_w < frame.width || out_h < frame.height);
  const int filter = (shrinking ? SWS_AREA : SWS_BICUBIC) | SWS_ACCURATE_RND;
  const auto source_format = static_cast<AVPixelFormat>(frame.format);
  const AVPixFmtDescriptor* desc = av_pix_fmt_desc_get(source_format);
  if (!desc) return false;
  const bool subsampled_yuv = !(desc->flags & (AV_PIX_FMT_FLAG_RGB | AV_PIX_FMT_FLAG_PAL)) &&
                              desc->nb_components >= 3 &&
                              (desc->log2_chroma_w > 0 || desc->log2_chroma_h > 0);
  const int* coefficients = sws_getCoefficients(matrix);
  const int full_range = range == AVCOL_RANGE_JPEG ? 1 : 0;
  to_444_.reset();
  if (subsampled_yuv) {
    // Pass 1: scale Y and chroma to 4:4:4 at the output size; same matrix
    // and range in and out, so no colour conversion happens here.
    to_444_.reset(sws_getContext(frame.width, frame.height, source_format, out_w, out_h,
                                 AV_PIX_FMT_YUV444P, filter, nullptr, nullptr, nullptr));
    if (!to_444_) return false;
    sws_setColorspaceDetails(to_444_.get(), coefficients, full_range, coefficients, full_range, 0,
                             1 << 16, 1 << 16);
    const int stride = (out_w + 63) / 64 * 64;  // aligned rows for the SIMD paths
    plane_stride_ = stride;
    planes_444_.assign(static_cast<size_t>(stride) * out_h * 3, 0);
    // Pass 2: 4:4:4 -> BGR, same size.
    to_bgr_.reset(sws_getContext(out_w, out_h, AV_PIX_FMT_YUV444P, out_w, out_h, AV_PIX_FMT_BGR24,
                                 SWS_POINT | SWS_ACCURATE_RND, nullptr, nullptr, nullptr));
  } else {
    // RGB, palette, grey and 4:4:4 YUV: one pass.
    to_bgr_.reset(sws_getContext(frame.width, frame.height, source_format, out_w, out_h,
                                 AV_PIX_FMT_BGR24, filter | SWS_FULL_CHR_H_INT, nullptr, nullptr,
                                 nullptr));
  }
  if (!to_bgr_) return false;
  // Decode with the stream's own matrix and range into full-range RGB.
  sws_setColorspaceDetails(to_bgr_.get(), coefficients, full_range,
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
    return input_error(
        path, std::string("cannot convert pixel format ") + (name ? name : "unknown") + " to BGR");
  }
  const bool quarter_turn = rotation_cw_ == 90 || rotation_cw_ == 270;
  const int out_w = quarter_turn ? output_.height : output_.width;
  const int out_h = quarter_turn ? output_.width : output_.height;
  cv::Mat& target = rotation_cw_ == 0 ? bgr : unrotated_;
  prepare_bgr(target, out_h, out_w);
  if (rotation_cw_ != 0) prepare_bgr(bgr, output_.height, output_.width);
  uint8_t* bgr_planes[4] = {target.data, nullptr, nullptr, nullptr};
  int bgr_strides[4] = {static_cast<int>(target.step[0]), 0, 0, 0};
  if (to_444_) {
    const size_t plane_size = static_cast<size_t>(plane_stride_) * out_h;
    uint8_t* yuv[4] = {planes_444_.data(), planes_444_.data() + plane_size,
                       planes_444_.data() + 2 * plane_size, nullptr};
    int yuv_strides[4] = {plane_stride_, plane_stride_, plane_stride_, 0};
    sws_scale(to_444_.get(), frame.data, frame.linesize, 0, frame.height, yuv, yuv_strides);
    sws_scale(to_bgr_.get(), yuv, yuv_strides, 0, out_h, bgr_planes, bgr_strides);
  } else {
    sws_scale(to_bgr_.get(), frame.data, frame.linesize, 0, frame.height, bgr_planes, bgr_strides);
  }
  if (rotation_cw_ == 90) cv::rotate(unrotated_, bgr, cv::ROTATE_90_CLOCKWISE);
  if (rotation_cw_ == 180) cv::rotate(unrotated_, bgr, cv::ROTATE_180);
  if (rotation_cw_ == 270) cv::rotate(unrotated_, bgr, cv::ROTATE_90_COUNTERCLOCKWISE);
  return Ok{};
}

}  // namespace clipwarden::decode
