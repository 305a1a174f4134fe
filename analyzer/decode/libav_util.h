// Small helpers shared by the libav-based readers: owning pointers for the
// libav objects, error text, the size limits, and opening an input with
// errors that name the cause in words a user understands.
#pragma once

#include <memory>
#include <string>
#include <vector>

extern "C" {
#include <libavcodec/avcodec.h>
#include <libavformat/avformat.h>
#include <libswresample/swresample.h>
#include <libswscale/swscale.h>
}

#include "clipwarden/error.h"

namespace clipwarden::decode {

struct FormatCloser {
  void operator()(AVFormatContext* c) const { avformat_close_input(&c); }
};
struct CodecFreer {
  void operator()(AVCodecContext* c) const { avcodec_free_context(&c); }
};
struct FrameFreer {
  void operator()(AVFrame* f) const { av_frame_free(&f); }
};
struct PacketFreer {
  void operator()(AVPacket* p) const { av_packet_free(&p); }
};
struct SwsFreer {
  void operator()(SwsContext* c) const { sws_freeContext(c); }
};
struct SwrFreer {
  void operator()(SwrContext* c) const { swr_free(&c); }
};
using FormatPtr = std::unique_ptr<AVFormatContext, FormatCloser>;
using CodecPtr = std::unique_ptr<AVCodecContext, CodecFreer>;
using FramePtr = std::unique_ptr<AVFrame, FrameFreer>;
using PacketPtr = std::unique_ptr<AVPacket, PacketFreer>;
using SwsPtr = std::unique_ptr<SwsContext, SwsFreer>;
using SwrPtr = std::unique_ptr<SwrContext, SwrFreer>;

// Largest frame we agree to decode: each side at most 16384 px and at most
// 8192 x 8192 pixels in all (8K UHD, 7680 x 4320, fits with room to spare).
// Declared sizes beyond this are treated as corrupt or hostile input before
// any frame buffer is allocated.
inline constexpr int kMaxSidePx = 16384;
inline constexpr int64_t kMaxPixels = int64_t{8192} * 8192;
bool frame_size_allowed(int width, int height);
std::string frame_size_cause(int width, int height);

// libav's text for an error code, e.g. "Invalid data found when processing input".
std::string av_error_text(int code);

// Routes libav's log through a filter: nothing is printed (the CLI's output
// stays one clear line per problem; CLIPWARDEN_AV_LOG=1 prints it too, for
// debugging); the last error-level message of the calling thread is kept so
// errors can quote libav's own reason. Note: libav's log callback is
// process-wide, so a host program's own libav logging is silenced too.
void install_quiet_av_log();
// The last libav error message logged on this thread ("" if none), and
// clearing it before a call whose reason we may want to quote.
std::string last_av_log_message();
void clear_av_log_message();

// Reads a whole file into `bytes` (reusing its capacity), followed by
// `zero_padding` zero bytes that are not counted in the returned size.
Expected<size_t> read_file_bytes(const std::string& path, std::vector<uint8_t>& bytes,
                                 size_t zero_padding = 0);

// Opens `path` with libavformat and reads the stream headers. Errors are
// input errors naming the path: missing or unreadable file, empty file,
// "not a video file FFmpeg can read", with libav's reason appended.
Expected<FormatPtr> open_input(const std::string& path);
// The second half of open_input, for a context opened some other way (an
// in-memory AVIOContext): refuses hostile frame sizes, then reads the
// stream headers with the decoder's pixel limit.
Expected<FormatPtr> read_stream_headers(FormatPtr format, const std::string& path);

// The stream a clip's frames come from: the first real video stream (cover
// art and text-as-video streams do not count). Error "no video stream",
// saying what the file holds instead.
Expected<int> find_video_stream(AVFormatContext* format, const std::string& path);

// An opened decoder for `stream` with frame+slice threading; threads <= 0
// means 2. max_pixels is set so a hostile size cannot allocate huge buffers.
Expected<CodecPtr> open_decoder(const AVStream* stream, int threads, const std::string& path);

// Clockwise degrees (0, 90, 180 or 270) that display the stream upright,
// from its display matrix side data.
int stream_rotation_cw(const AVStream* stream);

}  // namespace clipwarden::decode
