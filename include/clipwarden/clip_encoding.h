// How clips the library writes are encoded (injected defects, review
// previews): the caller's choices. The encoder itself is internal
// (analyzer/encode/clip_writer.h).
#pragma once

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

}  // namespace clipwarden
