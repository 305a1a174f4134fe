// WebP clips through libwebp's animation decoder (libwebpdemux): FFmpeg 5.1
// cannot decode animated WebP. Still WebP files come out as one frame.
#include <cstdio>
#include <cstring>
#include <filesystem>

#include <webp/demux.h>
#include <opencv2/imgproc.hpp>

#include "analyzer/decode/frame_scaler.h"
#include "analyzer/decode/image_sources.h"
#include "analyzer/decode/libav_util.h"
#include "analyzer/decode/stream_timing.h"

namespace clipwarden::decode {
namespace {

struct AnimDecoderDeleter {
  void operator()(WebPAnimDecoder* d) const { WebPAnimDecoderDelete(d); }
};
using AnimDecoderPtr = std::unique_ptr<WebPAnimDecoder, AnimDecoderDeleter>;

// The whole file stays in memory while decoding (libwebp's demuxer needs
// it): memory follows the file size, not the number of frames.
struct WebpFile {
  std::vector<uint8_t> bytes;
  AnimDecoderPtr decoder;
  WebPAnimInfo anim{};
};

Expected<std::unique_ptr<WebpFile>> open_webp(const std::string& path) {
  auto file = std::make_unique<WebpFile>();
  auto size = read_file_bytes(path, file->bytes);
  if (!size) return size.error();
  const WebPData data{file->bytes.data(), *size};
  // Check the declared canvas before the decoder allocates it.
  WebPDemuxer* demux = WebPDemux(&data);
  if (!demux) return input_error(path, "not a complete WebP file (truncated or corrupt)");
  const int width = static_cast<int>(WebPDemuxGetI(demux, WEBP_FF_CANVAS_WIDTH));
  const int height = static_cast<int>(WebPDemuxGetI(demux, WEBP_FF_CANVAS_HEIGHT));
  WebPDemuxDelete(demux);
  if (!frame_size_allowed(width, height)) return input_error(path, frame_size_cause(width, height));

  WebPAnimDecoderOptions options;
  if (!WebPAnimDecoderOptionsInit(&options))
    return Error{ErrorKind::internal, path, "libwebp version mismatch"};
  options.color_mode = MODE_BGRA;
  options.use_threads = 1;
  file->decoder.reset(WebPAnimDecoderNew(&data, &options));
  if (!file->decoder || !WebPAnimDecoderGetInfo(file->decoder.get(), &file->anim))
    return input_error(path, "not a WebP file libwebp can decode");
  if (file->anim.frame_count == 0) return input_error(path, "the WebP file holds no frames");
  return file;
}

ClipInfo describe_webp(const WebpFile& file, const std::string& path) {
  ClipInfo info;
  info.path = path;
  info.container = "webp";
  info.codec = "webp";
  info.pix_fmt = "bgra";  // what libwebp hands out; lossy WebP is 8-bit 4:2:0 inside
  info.bit_depth = 8;
  info.width = static_cast<int>(file.anim.canvas_width);
  info.height = static_cast<int>(file.anim.canvas_height);
  info.frame_count = file.anim.frame_count;
  // Durations from the container, without decoding.
  const WebPDemuxer* demux = WebPAnimDecoderGetDemuxer(file.decoder.get());
  WebPIterator it;
  int64_t total_ms = 0;
  if (WebPDemuxGetFrame(demux, 1, &it)) {
    do total_ms += it.duration;
    while (WebPDemuxNextFrame(&it));
    WebPDemuxReleaseIterator(&it);
  }
  info.duration_s = static_cast<double>(total_ms) / 1000.0;
  info.fps = info.duration_s > 0 ? static_cast<double>(info.frame_count) / info.duration_s : 0;
  return info;
}

class WebpSource final : public ClipSource {
 public:
  WebpSource(std::string path, std::unique_ptr<WebpFile> file, ClipInfo info, cv::Size output)
      : path_(std::move(path)),
        file_(std::move(file)),
        output_(output),
        timing_(1e-3, info.fps > 0 ? 1.0 / info.fps : 0.1),
        info_(std::move(info)) {}

  const ClipInfo& info() const override { return info_; }
  StreamFacts stream_facts() const override { return facts_; }

  Expected<FrameRead> read(DecodedFrame& out) override {
    if (!WebPAnimDecoderHasMoreFrames(file_->decoder.get())) {
      facts_ = timing_.facts();
      return FrameRead::end_of_clip;
    }
    uint8_t* canvas = nullptr;
    int end_ms = 0;
    if (!WebPAnimDecoderGetNext(file_->decoder.get(), &canvas, &end_ms))
      return input_error(path_, "corrupt WebP frame after frame " + std::to_string(frames_));
    const cv::Mat bgra(info_.height, info_.width, CV_8UC4, canvas);
    prepare_bgr(out.bgr, output_.height, output_.width);
    if (output_ == bgra.size()) {
      cv::cvtColor(bgra, out.bgr, cv::COLOR_BGRA2BGR);
    } else {
      const bool shrinking = output_.width <= bgra.cols && output_.height <= bgra.rows;
      cv::resize(bgra, resized_, output_, 0, 0, shrinking ? cv::INTER_AREA : cv::INTER_CUBIC);
      cv::cvtColor(resized_, out.bgr, cv::COLOR_BGRA2BGR);
    }
    out.index = frames_++;
    // libwebp gives each frame's end time; it starts where the previous ended.
    out.t_s = timing_.add(start_ms_, end_ms - start_ms_);
    start_ms_ = end_ms;
    return FrameRead::frame;
  }

 private:
  std::string path_;
  std::unique_ptr<WebpFile> file_;
  cv::Size output_;
  StreamTiming timing_;
  ClipInfo info_;
  StreamFacts facts_;
  cv::Mat resized_;
  int64_t frames_ = 0;
  int64_t start_ms_ = 0;
};

}  // namespace

bool looks_like_webp(const std::string& path) {
  std::error_code ec;
  if (!std::filesystem::is_regular_file(path, ec)) return false;
  std::FILE* f = std::fopen(path.c_str(), "rb");
  if (!f) return false;
  char head[12] = {};
  const size_t got = std::fread(head, 1, sizeof head, f);
  std::fclose(f);
  return got == sizeof head && std::memcmp(head, "RIFF", 4) == 0 &&
         std::memcmp(head + 8, "WEBP", 4) == 0;
}

Expected<std::unique_ptr<ClipSource>> open_webp_source(const std::string& path,
                                                       const SourceOptions& options) {
  auto file = open_webp(path);
  if (!file) return file.error();
  ClipInfo info = describe_webp(**file, path);
  const cv::Size output = working_size(info.width, info.height, options.working_long_side);
  return std::unique_ptr<ClipSource>(
      std::make_unique<WebpSource>(path, std::move(*file), std::move(info), output));
}

Expected<std::pair<ClipInfo, StreamFacts>> probe_webp(const std::string& path) {
  auto file = open_webp(path);
  if (!file) return file.error();
  ClipInfo info = describe_webp(**file, path);
  StreamTiming timing(1e-3, 0.1);
  const WebPDemuxer* demux = WebPAnimDecoderGetDemuxer((*file)->decoder.get());
  WebPIterator it;
  int64_t start_ms = 0;
  if (WebPDemuxGetFrame(demux, 1, &it)) {
    do {
      timing.add(start_ms, it.duration);
      start_ms += it.duration;
    } while (WebPDemuxNextFrame(&it));
    WebPDemuxReleaseIterator(&it);
  }
  return std::make_pair(std::move(info), timing.facts());
}

}  // namespace clipwarden::decode
