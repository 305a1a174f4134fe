// ClipSource over pictures in memory (clipwarden/frame_feed.h). The pictures
// go through the FrameScaler as RGB24 frames, the path PNG frames of a
// folder take, so the analysis frames match a folder of the same pictures
// bit for bit.
#include <cmath>

#include "analyzer/decode/frame_scaler.h"
#include "analyzer/decode/libav_util.h"
#include "analyzer/decode/stream_timing.h"
#include "clipwarden/frame_feed.h"

namespace clipwarden {
namespace {

std::string size_text(int width, int height) {
  return std::to_string(width) + "x" + std::to_string(height);
}

class FrameFeedSource final : public ClipSource {
 public:
  FrameFeedSource(FrameFeed feed, ClipInfo info, cv::Mat first, cv::Size output, double fps)
      : feed_(std::move(feed)),
        info_(std::move(info)),
        next_picture_(std::move(first)),
        scaler_(output, 0),
        timing_(1.0 / fps, 1.0 / fps) {}

  const ClipInfo& info() const override { return info_; }
  StreamFacts stream_facts() const override { return facts_; }

  Expected<FrameRead> read(DecodedFrame& out) override {
    if (done_) return FrameRead::end_of_clip;
    const std::string subject = info_.path + ": frame " + std::to_string(next_);
    if (next_picture_.empty()) {
      cv::Mat picture;
      auto more = feed_(picture);
      if (!more) return more.error();
      if (*more == FrameRead::end_of_clip) return finish();
      auto rgb8 = rgb8_picture(picture, subject);
      if (!rgb8) return rgb8.error();
      next_picture_ = std::move(*rgb8);
    }
    const cv::Mat picture = std::move(next_picture_);
    next_picture_.release();
    if (picture.cols != info_.width || picture.rows != info_.height)
      return usage_error(subject, "size " + size_text(picture.cols, picture.rows) +
                                      " differs from the first frame's " +
                                      size_text(info_.width, info_.height));
    frame_->format = AV_PIX_FMT_RGB24;
    frame_->width = picture.cols;
    frame_->height = picture.rows;
    frame_->data[0] = const_cast<uint8_t*>(picture.data);
    frame_->linesize[0] = static_cast<int>(picture.step[0]);
    out.index = next_;
    out.t_s = timing_.add(next_);
    ++next_;
    if (auto scaled = scaler_.convert(*frame_, out.bgr, info_.path); !scaled) return scaled.error();
    return FrameRead::frame;
  }

 private:
  Expected<FrameRead> finish() {
    done_ = true;
    facts_ = timing_.facts();
    // Exact now, whatever was announced.
    info_.frame_count = next_;
    info_.duration_s = static_cast<double>(next_) / info_.fps;
    return FrameRead::end_of_clip;
  }

  FrameFeed feed_;
  ClipInfo info_;
  cv::Mat next_picture_;  // the first picture, pulled at open
  decode::FramePtr frame_{av_frame_alloc()};
  decode::FrameScaler scaler_;
  decode::StreamTiming timing_;
  StreamFacts facts_;
  int64_t next_ = 0;
  bool done_ = false;
};

}  // namespace

Expected<cv::Mat> rgb8_picture(const cv::Mat& rgb, const std::string& subject) {
  if (rgb.dims != 2 || rgb.channels() != 3 || rgb.empty())
    return usage_error(subject, "a frame must be height x width x 3 (RGB), got " +
                                    std::to_string(rgb.channels()) + " channel(s)");
  if (rgb.depth() == CV_8U) return rgb;
  if (rgb.depth() != CV_32F && rgb.depth() != CV_64F)
    return usage_error(subject, "a frame must be 8-bit (0-255) or floating point (0-1)");
  cv::Point nan_at;
  if (!cv::checkRange(rgb, true, &nan_at, -1e300, 1e300))
    return usage_error(subject, "holds NaN or infinity at x=" + std::to_string(nan_at.x) +
                                    " y=" + std::to_string(nan_at.y));
  double low = 0, high = 0;
  cv::minMaxIdx(rgb.reshape(1), &low, &high);
  if (low < 0 || high > 1)
    return usage_error(subject, "floating-point frames must lie in [0, 1], found values from " +
                                    std::to_string(low) + " to " + std::to_string(high) +
                                    " (pass 0-255 levels as uint8)");
  cv::Mat levels;
  rgb.convertTo(levels, CV_8U, 255.0);  // rounds to the nearest level
  return levels;
}

Expected<std::unique_ptr<ClipSource>> open_frame_feed(FrameFeed feed, const FrameFeedInfo& info,
                                                      const SourceOptions& options) {
  if (!(info.fps > 0) || !std::isfinite(info.fps))
    return usage_error(info.name, "fps must be a positive number");
  if (info.frame_count < 0) return usage_error(info.name, "frame count must not be negative");
  if (!feed) return usage_error(info.name, "no frames given");
  cv::Mat first;
  auto more = feed(first);
  if (!more) return more.error();
  if (*more == FrameRead::end_of_clip) return input_error(info.name, "no frames given");
  auto rgb8 = rgb8_picture(first, info.name + ": frame 0");
  if (!rgb8) return rgb8.error();
  if (int64_t{rgb8->cols} * rgb8->rows > decode::kMaxPixels)
    return usage_error(info.name,
                       "frame size " + size_text(rgb8->cols, rgb8->rows) + " is too large");
  ClipInfo clip;
  clip.path = info.name;
  clip.container = "memory";
  clip.codec = "rawvideo";
  clip.pix_fmt = "rgb24";
  clip.width = rgb8->cols;
  clip.height = rgb8->rows;
  clip.fps = info.fps;
  clip.frame_count = info.frame_count;
  clip.duration_s = static_cast<double>(info.frame_count) / info.fps;
  const cv::Size output = decode::working_size(clip.width, clip.height, options.working_long_side);
  return std::unique_ptr<ClipSource>(std::make_unique<FrameFeedSource>(
      std::move(feed), std::move(clip), std::move(*rgb8), output, info.fps));
}

}  // namespace clipwarden
