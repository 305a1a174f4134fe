#include "analyzer/decode/libav_util.h"

#include "analyzer/decode/truncation.h"
#include "clipwarden/clip_source.h"

#include <algorithm>
#include <cerrno>
#include <cmath>
#include <cstdarg>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <mutex>
#include <vector>

extern "C" {
#include <libavutil/display.h>
}

namespace clipwarden::decode {
namespace {

thread_local std::string t_last_av_error;
bool g_forward_av_log = false;  // CLIPWARDEN_AV_LOG=1: also print libav's log (for debugging)

void quiet_log_callback(void* context, int level, const char* format, va_list args) {
  if (g_forward_av_log) {
    va_list copy;
    va_copy(copy, args);
    av_log_default_callback(context, level, format, copy);
    va_end(copy);
  }
  if (level > AV_LOG_ERROR) return;
  char line[512];
  std::vsnprintf(line, sizeof line, format, args);
  std::string text(line);
  while (!text.empty() && (text.back() == '\n' || text.back() == ' ')) text.pop_back();
  if (!text.empty()) t_last_av_error = std::move(text);
}

// Streams that libavformat presents as video but that are not pictures of a
// clip: text rendered as video (ANSI art and relatives) and cover art.
bool is_real_video(const AVStream* stream) {
  if (stream->codecpar->codec_type != AVMEDIA_TYPE_VIDEO) return false;
  if (stream->disposition & AV_DISPOSITION_ATTACHED_PIC) return false;
  switch (stream->codecpar->codec_id) {
    case AV_CODEC_ID_ANSI:
    case AV_CODEC_ID_BINTEXT:
    case AV_CODEC_ID_XBIN:
    case AV_CODEC_ID_IDF:
      return false;
    default:
      return true;
  }
}

std::string with_reason(std::string cause, const std::string& reason) {
  if (!reason.empty()) cause += " (" + reason + ")";
  return cause;
}

}  // namespace

bool frame_size_allowed(int width, int height) {
  return width > 0 && height > 0 && width <= kMaxSidePx && height <= kMaxSidePx &&
         int64_t{width} * height <= kMaxPixels;
}

std::string frame_size_cause(int width, int height) {
  return "declared frame size " + std::to_string(width) + "x" + std::to_string(height) +
         " is beyond the supported limit (" + std::to_string(kMaxSidePx) +
         " px a side, 8192x8192 pixels in all)";
}

std::string av_error_text(int code) {
  char text[AV_ERROR_MAX_STRING_SIZE] = {};
  av_strerror(code, text, sizeof text);
  return text;
}

void install_quiet_av_log() {
  static std::once_flag once;
  std::call_once(once, [] {
    const char* forward = std::getenv("CLIPWARDEN_AV_LOG");
    g_forward_av_log = forward && std::string(forward) == "1";
    av_log_set_callback(quiet_log_callback);
  });
}

std::string last_av_log_message() { return t_last_av_error; }
void clear_av_log_message() { t_last_av_error.clear(); }

Expected<size_t> read_file_bytes(const std::string& path, std::vector<uint8_t>& bytes,
                                 size_t zero_padding) {
  std::error_code ec;
  if (!std::filesystem::is_regular_file(path, ec)) return input_error(path, "not a regular file");
  std::FILE* file = std::fopen(path.c_str(), "rb");
  if (!file)
    return input_error(path, std::string("cannot read the file (") + std::strerror(errno) + ")");
  const auto size = std::filesystem::file_size(path, ec);
  size_t got = 0;
  if (!ec) {
    bytes.resize(size + zero_padding);
    got = std::fread(bytes.data(), 1, size, file);
  }
  const bool failed = ec || std::ferror(file) || got != size;
  std::fclose(file);
  if (failed) return input_error(path, "cannot read the file");
  std::fill(bytes.begin() + static_cast<std::ptrdiff_t>(got), bytes.end(), 0);
  return got;
}

Expected<FormatPtr> open_input(const std::string& path) {
  install_quiet_av_log();
  if (auto st = check_clip_path(path); !st) return st.error();
  std::error_code ec;
  if (std::filesystem::is_directory(path, ec)) return input_error(path, "is a folder, not a video file");
  if (std::filesystem::file_size(path, ec) == 0 && !ec) return input_error(path, "file is empty");

  clear_av_log_message();
  AVFormatContext* raw = nullptr;
  int rc = avformat_open_input(&raw, path.c_str(), nullptr, nullptr);
  if (rc < 0) {
    if (rc == AVERROR(EACCES) || rc == AVERROR(EPERM))
      return input_error(path, "cannot read the file (" + av_error_text(rc) + ")");
    if (rc == AVERROR_INVALIDDATA || rc == AVERROR_EOF) {
      if (auto cut = find_truncation(path)) return input_error(path, "truncated: " + *cut);
      return input_error(path,
                         with_reason("not a video file FFmpeg can read", last_av_log_message()));
    }
    const std::string reason = last_av_log_message();
    return input_error(path, "cannot open: " + (reason.empty() ? av_error_text(rc) : reason));
  }
  return read_stream_headers(FormatPtr(raw), path);
}

Expected<FormatPtr> read_stream_headers(FormatPtr format, const std::string& path) {
  // Refuse hostile sizes before stream probing decodes a first frame.
  for (unsigned i = 0; i < format->nb_streams; ++i) {
    const AVCodecParameters* par = format->streams[i]->codecpar;
    if (par->codec_type == AVMEDIA_TYPE_VIDEO && (par->width || par->height) &&
        !frame_size_allowed(par->width, par->height))
      return input_error(path, frame_size_cause(par->width, par->height));
  }
  std::vector<AVDictionary*> stream_options(format->nb_streams, nullptr);
  for (auto& options : stream_options) av_dict_set_int(&options, "max_pixels", kMaxPixels, 0);
  clear_av_log_message();
  const int rc = avformat_find_stream_info(format.get(), stream_options.data());
  for (auto& options : stream_options) av_dict_free(&options);
  if (rc < 0)
    return input_error(path,
                       with_reason("not a video file FFmpeg can read", last_av_log_message()));
  return format;
}

Expected<int> find_video_stream(AVFormatContext* format, const std::string& path) {
  int audio = 0, subtitle = 0, cover = 0;
  for (unsigned i = 0; i < format->nb_streams; ++i) {
    const AVStream* stream = format->streams[i];
    if (is_real_video(stream)) {
      const AVCodecParameters* par = stream->codecpar;
      if (par->width <= 0 || par->height <= 0)  // the first frame did not decode while probing
        return input_error(
            path, with_reason("the first video frame does not decode", last_av_log_message()));
      if (!frame_size_allowed(par->width, par->height))
        return input_error(path, frame_size_cause(par->width, par->height));
      return static_cast<int>(i);
    }
    const auto type = stream->codecpar->codec_type;
    cover += type == AVMEDIA_TYPE_VIDEO;
    audio += type == AVMEDIA_TYPE_AUDIO;
    subtitle += type == AVMEDIA_TYPE_SUBTITLE;
  }
  std::string holds;
  if (audio) holds = "audio";
  if (subtitle) holds += std::string(holds.empty() ? "" : " and ") + "subtitles";
  if (cover) holds += std::string(holds.empty() ? "" : " and ") + "a still picture";
  return input_error(path, holds.empty() ? "no video stream"
                                         : "no video stream (the file holds only " + holds + ")");
}

Expected<CodecPtr> open_decoder(const AVStream* stream, int threads, const std::string& path) {
  const AVCodec* codec = avcodec_find_decoder(stream->codecpar->codec_id);
  if (!codec)
    return input_error(
        path, std::string("no decoder for codec ") + avcodec_get_name(stream->codecpar->codec_id));
  CodecPtr context(avcodec_alloc_context3(codec));
  if (!context) return Error{ErrorKind::internal, path, "out of memory opening the decoder"};
  int rc = avcodec_parameters_to_context(context.get(), stream->codecpar);
  if (rc < 0) return input_error(path, "bad codec parameters: " + av_error_text(rc));
  context->pkt_timebase = stream->time_base;
  context->thread_count = threads > 0 ? threads : 2;
  context->thread_type = FF_THREAD_FRAME | FF_THREAD_SLICE;
  context->max_pixels = kMaxPixels;
  clear_av_log_message();
  rc = avcodec_open2(context.get(), codec, nullptr);
  if (rc < 0)
    return input_error(path, with_reason(std::string("cannot open the ") + codec->name + " decoder",
                                         last_av_log_message()));
  return context;
}

int stream_rotation_cw(const AVStream* stream) {
  const uint8_t* matrix = av_stream_get_side_data(stream, AV_PKT_DATA_DISPLAYMATRIX, nullptr);
  if (!matrix) return 0;
  // av_display_rotation_get gives the counter-clockwise angle the matrix
  // rotates by; displaying upright needs the opposite, clockwise.
  const double ccw = av_display_rotation_get(reinterpret_cast<const int32_t*>(matrix));
  if (std::isnan(ccw)) return 0;
  int cw = static_cast<int>(std::lround(-ccw)) % 360;
  if (cw < 0) cw += 360;
  // Snap to the quarter turns that a display can apply without resampling.
  return ((cw + 45) / 90) % 4 * 90;
}

}  // namespace clipwarden::decode
