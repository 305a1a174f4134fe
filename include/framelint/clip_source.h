// Reading clips: a streaming source of analysis frames. A clip is a video
// file in any container FFmpeg reads (animated GIF and WebP included) or a
// folder of numbered PNG/JPEG frames. Frames are handed out one at a time;
// memory never grows with clip length.
#pragma once

#include <cstdint>
#include <memory>
#include <optional>
#include <string>

#include <opencv2/core.hpp>

#include "framelint/error.h"
#include "framelint/report.h"

namespace framelint {

struct SourceOptions {
  // Long side of the analysis frames in pixels; 0 keeps the native size.
  // Frames are scaled once, in colour, with an area/bicubic filter.
  int working_long_side = 512;
  // Frame rate for folders of images (ignored for video files).
  std::optional<double> folder_fps;
  // Decoder threads; 0 lets the library choose.
  int threads = 0;
};

// One decoded frame, already rotated for display and scaled to the working
// size.
struct DecodedFrame {
  int64_t index = 0;  // 0-based decode order
  double t_s = 0;     // presentation time from the first frame, seconds
  cv::Mat bgr;        // CV_8UC3, working size
};

class ClipSource {
 public:
  virtual ~ClipSource() = default;

  // Opens a file or a frame folder. Errors name the path and the cause.
  static Expected<std::unique_ptr<ClipSource>> open(const std::string& path,
                                                    const SourceOptions& options);

  // Container facts known before decoding. frame_count, duration_s and fps
  // are the container's estimates until finish_info() is called.
  virtual const ClipInfo& info() const = 0;

  // Next frame into `frame`. Returns false at the end of the clip, or an
  // input Error when the data is corrupt beyond recovery.
  virtual Expected<bool> read(DecodedFrame& frame) = 0;

  // Timing facts measured while reading (valid after read() returned false).
  virtual StreamFacts stream_facts() const = 0;
};

// Container facts without decoding every frame (`framelint probe`): the
// ClipInfo plus the stream facts, as a JSON object.
Expected<nlohmann::json> probe_clip(const std::string& path, const SourceOptions& options);

// Hex SHA-256 of a file's bytes (the store's content key).
Expected<std::string> sha256_file(const std::string& path);

}  // namespace framelint
