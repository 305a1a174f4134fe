// Pictures and video the review pages show for one clip, made on request
// from the clip named by the queue: a strip of frames for the queue row, a
// browser-playable preview when the source codec is not one browsers play,
// and the picture panels of one frame.
#pragma once

#include <cstdint>
#include <string>

#include <nlohmann/json.hpp>

#include "clipwarden/error.h"

namespace clipwarden::review {

// A JPEG of `count` frames spread evenly over the clip, side by side, each
// `height` pixels high.
Expected<std::string> frame_strip_jpeg(const std::string& clip_path, int count, int height);

// True when Chromium and Firefox play the clip as it is: H.264 in MP4/MOV,
// VP8/VP9/AV1 in WebM/MP4, with 8-bit 4:2:0 pictures. `clip` is the
// report's "clip" object (container, codec, pix_fmt).
bool browser_plays(const nlohmann::json& clip);

// Writes an H.264 MP4 of the clip (its own timestamps, long side at most
// 1280 px) to `out_path`; an output error when libav has no H.264 encoder.
Status write_browser_preview(const std::string& clip_path, const std::string& out_path);

// Frame `frame` as a JPEG of four panels (current frame, previous frame
// warped onto it, warp error heat map, motion colours; see docs/html.md),
// at the analysis working size of `settings` (the report's settings).
Expected<std::string> frame_panels_jpeg(const std::string& clip_path, int64_t frame,
                                        const nlohmann::json& settings);

}  // namespace clipwarden::review
