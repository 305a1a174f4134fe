// Reading clips: a streaming source of analysis frames. A clip is a video
// file in any container FFmpeg reads (animated GIF and WebP included) or a
// folder of numbered PNG/JPEG frames. Frames are handed out one at a time;
// memory never grows with clip length.
#pragma once

#include <cstdint>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include <opencv2/core.hpp>

#include "clipwarden/error.h"
#include "clipwarden/report.h"

namespace clipwarden {

struct SourceOptions {
  // Long side of the analysis frames in pixels; 0 keeps the native size.
  // Frames are scaled once, in colour, with an area/bicubic filter.
  int working_long_side = 512;
  // Frame rate for folders of images (ignored for video files).
  std::optional<double> folder_fps;
  // Decoder threads (frame + slice threading); 0 means 2.
  int threads = 0;
};

// One decoded frame, already rotated for display and scaled to the working
// size. Pass the same DecodedFrame to every read(): its buffer is reused
// unless another cv::Mat still shares it (a kept frame is never overwritten).
struct DecodedFrame {
  int64_t index = 0;  // 0-based decode order
  double t_s = 0;     // presentation time from the first frame, seconds
  cv::Mat bgr;        // CV_8UC3, working size
};

// What one read() got. Not a bool: "false" for the end of the clip would
// read like a failure, and Expected's own test already means "no error".
enum class FrameRead {
  frame,        // the next frame was written into the DecodedFrame
  end_of_clip,  // no more frames; the clip was read to its end
};

class ClipSource {
 public:
  virtual ~ClipSource() = default;

  // Opens a file or a frame folder. Errors name the path and the cause.
  static Expected<std::unique_ptr<ClipSource>> open(const std::string& path,
                                                    const SourceOptions& options);

  // What the clip is. frame_count, duration_s and fps are the container's
  // estimates until read() has returned end_of_clip; then they are exact, and
  // audio.duration_s / audio.silent_from_s come from the decoded sound.
  // width/height are the displayed size (rotation and pixel aspect
  // applied). sha256 is left for the caller.
  virtual const ClipInfo& info() const = 0;

  // Next frame into `frame`: FrameRead::frame, FrameRead::end_of_clip at the
  // end, or an input Error when the data is corrupt beyond recovery
  // ("truncated or unreadable after frame 41 (...)"); packets that fail to
  // decode in the middle of a stream are skipped.
  virtual Expected<FrameRead> read(DecodedFrame& frame) = 0;

  // Timing facts measured while reading (valid after read() returned
  // end_of_clip).
  virtual StreamFacts stream_facts() const = 0;

  // Cautions about the file that do not stop the analysis (e.g. stray bytes
  // after an MP4's last box); complete after read() returned end_of_clip.
  virtual std::vector<std::string> notes() const { return {}; }
};

// Container facts without decoding video (`clipwarden probe`): the ClipInfo
// (sha256 empty for a folder) plus "stream" with the StreamFacts, as a JSON object with
// the report's key names. The frame count and timing facts come from the
// video packets; the audio facts from decoding the audio.
Expected<nlohmann::json> probe_clip(const std::string& path, const SourceOptions& options);

// The one input check every entry point makes before touching a clip: it
// must exist and be a regular file or a folder. A device (/dev/zero), a FIFO
// or a socket is refused at once: reading one could block or never end.
Status check_clip_path(const std::string& path);

// Hex SHA-256 of a file's bytes (the store's content key).
Expected<std::string> sha256_file(const std::string& path);

}  // namespace clipwarden
