// Analysing pictures that are already in memory (a sampler's output, frames
// decoded by another library): a ClipSource over a callback that hands out
// RGB pictures one at a time. They are scaled to the working size by the
// same filter as decoded files (area averaging when shrinking, bicubic
// otherwise), so a picture gives the same analysis frame whether it comes
// from here or from a PNG file. Only the picture being converted is held,
// so memory does not grow with the number of frames.
#pragma once

#include <cstdint>
#include <functional>
#include <memory>
#include <string>

#include <opencv2/core.hpp>

#include "clipwarden/clip_source.h"
#include "clipwarden/error.h"

namespace clipwarden {

// Puts the next picture into `rgb` and returns FrameRead::frame, or returns
// FrameRead::end_of_clip at the end. A picture is H x W x 3, RGB, of type CV_8UC3 (levels 0-255) or
// CV_32FC3 / CV_64FC3 (0-1); every picture has the first one's size. An
// Error returned here ends the analysis with that error.
using FrameFeed = std::function<Expected<FrameRead>(cv::Mat& rgb)>;

struct FrameFeedInfo {
  std::string name = "frames";  // what the report names as clip.path
  double fps = 24;              // frame i is at i / fps seconds
  int64_t frame_count = 0;      // when known in advance (0 = unknown until the end)
};

// Pulls the first picture at once (the clip's size comes from it): a feed
// with no picture, or a bad first picture, is an error here.
// options.working_long_side applies as for files; the rest is ignored.
Expected<std::unique_ptr<ClipSource>> open_frame_feed(FrameFeed feed, const FrameFeedInfo& info,
                                                      const SourceOptions& options);

// One picture as 8-bit RGB: CV_8UC3 is returned as is; floating point is
// checked to lie in [0, 1] (NaN and values outside are errors naming
// `subject`) and mapped to round(255 v). Other types are errors.
Expected<cv::Mat> rgb8_picture(const cv::Mat& rgb, const std::string& subject);

}  // namespace clipwarden
