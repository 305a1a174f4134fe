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

#include "clipwarden/clip_encoding.h"
#include "clipwarden/error.h"

namespace clipwarden {

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
