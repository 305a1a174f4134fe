// Clips that are not one video file for libavformat: folders of numbered
// PNG/JPEG frames, and WebP files (FFmpeg 5.1 cannot decode animated WebP,
// so they go through libwebp's animation decoder).
#pragma once

#include <memory>
#include <string>
#include <utility>
#include <vector>

#include "clipwarden/clip_source.h"

namespace clipwarden::decode {

// Frame rate of a folder when SourceOptions::folder_fps is not given.
inline constexpr double kDefaultFolderFps = 24.0;

// Orders names as people count: "f2.png" before "f10.png". Digit runs
// compare by value, other text by character.
bool natural_less(const std::string& a, const std::string& b);

// The PNG/JPEG files of `folder` (by extension, case-insensitive), in
// natural order. Other files are ignored.
std::vector<std::string> list_frame_files(const std::string& folder);

Expected<std::unique_ptr<ClipSource>> open_folder_source(const std::string& folder,
                                                         const SourceOptions& options);
// probe: the folder's facts from its file list and first frame.
Expected<std::pair<ClipInfo, StreamFacts>> probe_folder(const std::string& folder,
                                                        const SourceOptions& options);

// True when `path` is a regular file that starts like a WebP file ("RIFF"
// size "WEBP"). Never opens anything else (a named pipe would block).
bool looks_like_webp(const std::string& path);
Expected<std::unique_ptr<ClipSource>> open_webp_source(const std::string& path,
                                                       const SourceOptions& options);
// probe: frame count and timing from the WebP container, no decoding.
Expected<std::pair<ClipInfo, StreamFacts>> probe_webp(const std::string& path);

}  // namespace clipwarden::decode
