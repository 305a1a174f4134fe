// Clips that libavformat/libavcodec read: every container and codec of
// FFmpeg (MP4, WebM, MKV, AVI, MOV, GIF, ...).
#pragma once

#include <memory>
#include <string>

#include "analyzer/decode/libav_util.h"
#include "clipwarden/clip_source.h"

namespace clipwarden::decode {

// What the container says about the clip before decoding: format, codec,
// pixel format, displayed size and rotation, estimated frame count,
// duration and average rate, and whether there is sound.
ClipInfo describe_container(const AVFormatContext* format, int video_index,
                            const std::string& path);

// The seconds per frame the container states (1 / average or guessed rate;
// 0 when it states none).
double stated_frame_interval_s(const AVStream* stream);

Expected<std::unique_ptr<ClipSource>> open_libav_source(const std::string& path,
                                                        const SourceOptions& options);
// The same on a context already opened by read_stream_headers (e.g. over
// memory); `path` only names the clip in errors and the ClipInfo.
Expected<std::unique_ptr<ClipSource>> open_libav_source(FormatPtr format, const std::string& path,
                                                        const SourceOptions& options);

// probe: frame count and timing facts from the video packets' timestamps
// (no video decoding), audio facts from decoding the audio packets.
Expected<std::pair<ClipInfo, StreamFacts>> probe_libav(const std::string& path);

}  // namespace clipwarden::decode
