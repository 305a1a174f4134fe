// Writing clips: a streaming encoder for BGR frames with their own
// timestamps (libav). H.264 (libx264) in .mp4 when that encoder is present,
// otherwise lossless FFV1 in .mkv; FFV1 can also be chosen on purpose, so
// that injected test defects are not blurred by compression. Frames go in
// one at a time; memory never grows with clip length. The file is written
// under a temporary name and renamed into place by finish().
#pragma once

#include <memory>
#include <string>

#include <opencv2/core.hpp>

#include "clipwarden/error.h"

namespace clipwarden {

enum class VideoCodec {
  automatic,  // H.264 if libx264 is available, else FFV1
  h264,       // libx264, yuv420p (yuv444p for odd sizes), BT.709 tagged
  ffv1,       // lossless, bgr0: decodes back to the exact input pixels
};
const char* to_string(VideoCodec codec);

struct ClipWriterOptions {
  VideoCodec codec = VideoCodec::automatic;
  // H.264 constant rate factor, 0 (visually lossless, large) to 51 (worst).
  // 18 is commonly treated as visually transparent (common practice).
  int crf = 18;
  // Nominal frame rate: recorded in the stream and used by the rate control.
  // Timestamps come from each frame; frames may sit off this grid.
  double nominal_fps = 25;
  // Encoder threads; 0 lets libav choose.
  int threads = 0;
};

class ClipWriter {
 public:
  virtual ~ClipWriter() = default;

  // Opens an encoder for frames of width x height. The container follows the
  // codec: .mp4 for H.264, .mkv for FFV1; when `path` has the other
  // extension it is replaced (see path()). Errors name the path.
  static Expected<std::unique_ptr<ClipWriter>> create(const std::string& path, int width, int height,
                                                      const ClipWriterOptions& options);

  // The file that finish() produces (extension possibly changed).
  virtual const std::string& path() const = 0;
  virtual VideoCodec codec() const = 0;

  // One CV_8UC3 frame of the declared size at presentation time t_s
  // (seconds, strictly increasing).
  virtual Status write(const cv::Mat& bgr, double t_s) = 0;

  // Flushes the encoder, writes the trailer and moves the file into place.
  // Without finish() (e.g. after an error) the partial file is removed.
  virtual Status finish() = 0;

  virtual int64_t frames_written() const = 0;
};

// True when libav was built with the libx264 encoder.
bool h264_encoder_available();

}  // namespace clipwarden
