// Test helpers for the injector and the encoder: small synthetic clips with
// known content, written with our own encoder, and whole-clip reads that
// keep every frame. Temporary folders and outside tools: support/clips.h.
#pragma once

#include <string>
#include <vector>

#include <opencv2/core.hpp>

#include "clipwarden/clip_source.h"
#include "analyzer/encode/clip_writer.h"

namespace clipwarden::test {

// Frame `index` of a synthetic scene: a smooth colour gradient with a
// checker texture that pans `pan_px_per_frame` to the right, and a bright
// disc moving down. Deterministic.
cv::Mat synthetic_frame(cv::Size size, int index, double pan_px_per_frame = 1.0);

// Writes `frames` synthetic frames at `fps` (frame i at i / fps seconds).
// Returns the written path (the extension follows the codec).
Expected<std::string> write_synthetic_clip(const std::string& path, cv::Size size, int frames, double fps,
                                           VideoCodec codec = VideoCodec::ffv1);

// Every frame of a clip at its native size, pixels kept.
struct DecodedClip {
  std::vector<DecodedFrame> frames;
  StreamFacts stream;
};
Expected<DecodedClip> read_whole_clip(const std::string& path);

// Mean relative luminance of a BGR frame.
double mean_relative_luminance(const cv::Mat& bgr);

// True when the two frames are equal pixel for pixel.
bool same_pixels(const cv::Mat& a, const cv::Mat& b);

}  // namespace clipwarden::test
