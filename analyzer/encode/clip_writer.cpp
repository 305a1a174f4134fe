// ClipWriter on libav: BGR frame -> swscale -> encoder -> muxer, one frame at
// a time. Timestamps are kept in a 1/90000 s time base (the MPEG clock: every
// common frame rate, 8 to 60 fps and 30000/1001, has an exact whole-tick
// interval) and rescaled to whatever the muxer settles on (Matroska: 1 ms).
#include <cmath>
#include <cstring>
#include <filesystem>

extern "C" {
#include <libavcodec/avcodec.h>
#include <libavformat/avformat.h>
#include <libavutil/opt.h>
#include <libswscale/swscale.h>
}

#include "analyzer/decode/libav_util.h"
#include "analyzer/encode/clip_writer.h"

namespace clipwarden {

const char* to_string(VideoCodec codec) {
  switch (codec) {
    case VideoCodec::automatic: return "auto";
    case VideoCodec::h264: return "h264";
    case VideoCodec::ffv1: return "ffv1";
  }
  return "auto";
}

bool h264_encoder_available() { return avcodec_find_encoder_by_name("libx264") != nullptr; }

namespace {

using decode::av_error_text;
using decode::CodecPtr;
using decode::FramePtr;
using decode::PacketPtr;
using decode::SwsPtr;

// Output contexts are freed, not closed like inputs; the writer closes the
// file (pb) itself before.
struct OutputFormatFree {
  void operator()(AVFormatContext* f) const { avformat_free_context(f); }
};
using OutputFormatPtr = std::unique_ptr<AVFormatContext, OutputFormatFree>;

constexpr AVRational kTimeBase{1, 90000};

// The file name finish() produces: the codec decides the container.
std::string output_path_for(const std::string& path, VideoCodec codec) {
  std::filesystem::path p(path);
  p.replace_extension(codec == VideoCodec::h264 ? ".mp4" : ".mkv");
  return p.string();
}

// A hidden sibling with the same extension, so the muxer guess still works.
std::string partial_path_for(const std::string& final_path) {
  std::filesystem::path p(final_path);
  return (p.parent_path() / ("." + p.stem().string() + ".partial" + p.extension().string())).string();
}

// Zeroes every plane including the padding at the end of each line: the
// encoder's SIMD code may read it, and left uninitialised it would make the
// output bytes depend on what the heap held before.
void clear_planes(AVFrame* frame) {
  for (int p = 0; p < AV_NUM_DATA_POINTERS && frame->buf[p]; ++p)
    std::memset(frame->buf[p]->data, 0, frame->buf[p]->size);
}

class LibavClipWriter final : public ClipWriter {
 public:
  ~LibavClipWriter() override {
    close_all();
    if (!finished_ && !partial_path_.empty()) {
      std::error_code ec;
      std::filesystem::remove(partial_path_, ec);
    }
  }

  Status open(const std::string& requested, int width, int height, const ClipWriterOptions& options) {
    decode::install_quiet_av_log();  // encoder chatter (x264's statistics) stays off stderr
    codec_ = options.codec;
    if (codec_ == VideoCodec::automatic) codec_ = h264_encoder_available() ? VideoCodec::h264 : VideoCodec::ffv1;
    final_path_ = output_path_for(requested, codec_);
    partial_path_ = partial_path_for(final_path_);
    width_ = width;
    height_ = height;
    if (width <= 0 || height <= 0) return output_error(final_path_, "frame size must be positive");
    if (!(options.nominal_fps > 0 && options.nominal_fps <= 1000))
      return output_error(final_path_, "nominal frame rate must be in (0, 1000]");
    if (options.crf < 0 || options.crf > 51) return output_error(final_path_, "crf must be from 0 to 51");

    const AVCodec* encoder = avcodec_find_encoder_by_name(codec_ == VideoCodec::h264 ? "libx264" : "ffv1");
    if (!encoder) return output_error(final_path_, std::string("encoder ") + to_string(codec_) + " is not available");
    if (Status s = open_encoder(encoder, options); !s) return s;
    if (Status s = open_muxer(); !s) return s;
    return Ok{};
  }

  const std::string& path() const override { return final_path_; }
  VideoCodec codec() const override { return codec_; }
  int64_t frames_written() const override { return frames_; }

  Status write(const cv::Mat& bgr, double t_s) override {
    if (finished_ || !enc_) return output_error(final_path_, "write after finish");
    if (bgr.type() != CV_8UC3 || bgr.cols != width_ || bgr.rows != height_)
      return output_error(final_path_, "frame " + std::to_string(frames_) + " is not a " + std::to_string(width_) +
                                           "x" + std::to_string(height_) + " BGR image");
    const int64_t pts = std::llround(t_s * kTimeBase.den);
    if (frames_ > 0 && pts <= last_pts_)
      return output_error(final_path_, "frame " + std::to_string(frames_) + " time " + std::to_string(t_s) +
                                           " s does not increase");
    if (int err = av_frame_make_writable(frame_.get()); err < 0) return av_failure("frame buffer", err);
    // swscale picks its SIMD or plain-C path by the input's alignment, and
    // the two round differently: copying into our own aligned buffer first
    // makes the encoded bytes independent of where the caller's image lives.
    for (int y = 0; y < height_; ++y)
      std::memcpy(source_->data[0] + static_cast<ptrdiff_t>(y) * source_->linesize[0], bgr.ptr(y),
                  static_cast<size_t>(width_) * 3);
    sws_scale(sws_.get(), source_->data, source_->linesize, 0, height_, frame_->data, frame_->linesize);
    frame_->pts = pts;
    last_pts_ = pts;
    ++frames_;
    return send(frame_.get());
  }

  Status finish() override {
    if (finished_) return Ok{};
    if (!enc_) return output_error(final_path_, "encoder is not open");
    if (Status s = send(nullptr); !s) return s;
    if (int err = av_write_trailer(fmt_.get()); err < 0) return av_failure("trailer", err);
    close_all();
    std::error_code ec;
    std::filesystem::rename(partial_path_, final_path_, ec);
    if (ec) return output_error(final_path_, "cannot move the finished clip into place: " + ec.message());
    finished_ = true;
    return Ok{};
  }

 private:
  Status open_encoder(const AVCodec* encoder, const ClipWriterOptions& options) {
    enc_.reset(avcodec_alloc_context3(encoder));
    if (!enc_) return output_error(final_path_, "out of memory");
    const bool even = width_ % 2 == 0 && height_ % 2 == 0;
    const AVPixelFormat pix_fmt = codec_ == VideoCodec::ffv1 ? AV_PIX_FMT_BGR0
                                  : even                     ? AV_PIX_FMT_YUV420P
                                                             : AV_PIX_FMT_YUV444P;  // 4:2:0 needs even sizes
    enc_->width = width_;
    enc_->height = height_;
    enc_->pix_fmt = pix_fmt;
    enc_->time_base = kTimeBase;
    enc_->framerate = av_d2q(options.nominal_fps, 1 << 20);
    enc_->thread_count = options.threads;
    AVDictionary* opts = nullptr;
    if (codec_ == VideoCodec::h264) {
      enc_->colorspace = AVCOL_SPC_BT709;
      enc_->color_primaries = AVCOL_PRI_BT709;
      enc_->color_trc = AVCOL_TRC_BT709;
      enc_->color_range = AVCOL_RANGE_MPEG;
      av_dict_set(&opts, "crf", std::to_string(options.crf).c_str(), 0);
      av_dict_set(&opts, "preset", "medium", 0);
    } else {
      av_dict_set(&opts, "level", "3", 0);  // FFV1 version 3: per-slice CRCs
    }
    fmt_ctx_for_flags_ = av_guess_format(nullptr, final_path_.c_str(), nullptr);
    if (fmt_ctx_for_flags_ && (fmt_ctx_for_flags_->flags & AVFMT_GLOBALHEADER))
      enc_->flags |= AV_CODEC_FLAG_GLOBAL_HEADER;
    const int err = avcodec_open2(enc_.get(), encoder, &opts);
    av_dict_free(&opts);
    if (err < 0) return av_failure("opening the encoder", err);

    frame_.reset(av_frame_alloc());
    source_.reset(av_frame_alloc());
    packet_.reset(av_packet_alloc());
    if (!frame_ || !source_ || !packet_) return output_error(final_path_, "out of memory");
    source_->format = AV_PIX_FMT_BGR24;
    source_->width = width_;
    source_->height = height_;
    if (int e = av_frame_get_buffer(source_.get(), 64); e < 0) return av_failure("frame buffer", e);
    clear_planes(source_.get());
    frame_->format = pix_fmt;
    frame_->width = width_;
    frame_->height = height_;
    if (int e = av_frame_get_buffer(frame_.get(), 0); e < 0) return av_failure("frame buffer", e);
    clear_planes(frame_.get());
    sws_.reset(sws_getContext(width_, height_, AV_PIX_FMT_BGR24, width_, height_, pix_fmt, SWS_BICUBIC | SWS_ACCURATE_RND,
                              nullptr, nullptr, nullptr));
    if (!sws_) return output_error(final_path_, "no pixel conversion to the encoder's format");
    if (codec_ == VideoCodec::h264) {
      // Tag and convert with the same BT.709 limited-range matrix.
      const int* coefficients = sws_getCoefficients(SWS_CS_ITU709);
      sws_setColorspaceDetails(sws_.get(), coefficients, 1, coefficients, 0, 0, 1 << 16, 1 << 16);
    }
    return Ok{};
  }

  Status open_muxer() {
    AVFormatContext* raw = nullptr;
    int err = avformat_alloc_output_context2(&raw, nullptr, nullptr, final_path_.c_str());
    if (err < 0 || !raw) return av_failure("choosing the container", err);
    fmt_.reset(raw);
    stream_ = avformat_new_stream(raw, nullptr);
    if (!stream_) return output_error(final_path_, "out of memory");
    stream_->time_base = kTimeBase;
    stream_->avg_frame_rate = enc_->framerate;
    if ((err = avcodec_parameters_from_context(stream_->codecpar, enc_.get())) < 0)
      return av_failure("stream parameters", err);
    if ((err = avio_open(&raw->pb, partial_path_.c_str(), AVIO_FLAG_WRITE)) < 0)
      return av_failure("opening the file", err);
    if ((err = avformat_write_header(raw, nullptr)) < 0) return av_failure("writing the header", err);
    return Ok{};
  }

  // Sends one frame (nullptr flushes) and writes every packet that comes out.
  Status send(AVFrame* frame) {
    int err = avcodec_send_frame(enc_.get(), frame);
    if (err < 0) return av_failure("encoding", err);
    while ((err = avcodec_receive_packet(enc_.get(), packet_.get())) >= 0) {
      av_packet_rescale_ts(packet_.get(), enc_->time_base, stream_->time_base);
      packet_->stream_index = stream_->index;
      err = av_interleaved_write_frame(fmt_.get(), packet_.get());  // takes the packet's data
      if (err < 0) return av_failure("writing a packet", err);
    }
    if (err == AVERROR(EAGAIN) || err == AVERROR_EOF) return Ok{};
    return av_failure("encoding", err);
  }

  Error av_failure(const std::string& step, int err) const {
    return output_error(final_path_, step + " failed: " + av_error_text(err));
  }

  void close_all() {
    if (fmt_ && fmt_->pb) avio_closep(&fmt_->pb);
    fmt_.reset();
    enc_.reset();
    sws_.reset();
    frame_.reset();
    source_.reset();
    packet_.reset();
  }

  VideoCodec codec_ = VideoCodec::automatic;
  std::string final_path_, partial_path_;
  int width_ = 0, height_ = 0;
  int64_t frames_ = 0, last_pts_ = 0;
  bool finished_ = false;
  const AVOutputFormat* fmt_ctx_for_flags_ = nullptr;
  CodecPtr enc_;
  OutputFormatPtr fmt_;
  FramePtr frame_, source_;  // encoder input; aligned copy of the caller's BGR frame
  PacketPtr packet_;
  SwsPtr sws_;
  AVStream* stream_ = nullptr;
};

}  // namespace

Expected<std::unique_ptr<ClipWriter>> ClipWriter::create(const std::string& path, int width, int height,
                                                         const ClipWriterOptions& options) {
  auto writer = std::make_unique<LibavClipWriter>();
  if (Status s = writer->open(path, width, height, options); !s) return s.error();
  return std::unique_ptr<ClipWriter>(std::move(writer));
}

}  // namespace clipwarden
