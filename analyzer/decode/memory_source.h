// Clips held in memory rather than in a file: the libav reader over a
// custom AVIOContext. Used by the decoder fuzz target and by tests that
// build damaged inputs byte by byte; the CLI always reads files.
#pragma once

#include <cstdint>
#include <memory>
#include <string>

#include "clipwarden/clip_source.h"

namespace clipwarden::decode {

// Opens `size` bytes at `data` (copied; the caller's buffer may go away) as
// a clip of any container libavformat reads by content. `name` only names
// the clip in errors and in the ClipInfo. The demuxer may not open other
// files or URLs (playlists and concat lists cannot reach outside the bytes);
// WebP (read by libwebp from files) is not handled here.
Expected<std::unique_ptr<ClipSource>> open_memory_source(const uint8_t* data, size_t size,
                                                         const std::string& name,
                                                         const SourceOptions& options);

}  // namespace clipwarden::decode
