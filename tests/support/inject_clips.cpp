#include "support/inject_clips.h"

#include <cmath>

#include <opencv2/imgproc.hpp>

#include "analyzer/color/relative_luminance.h"
#include "support/decode_read.h"

namespace clipwarden::test {

cv::Mat synthetic_frame(cv::Size size, int index, double pan_px_per_frame) {
  cv::Mat frame(size, CV_8UC3);
  const double shift = pan_px_per_frame * index;
  for (int y = 0; y < size.height; ++y)
    for (int x = 0; x < size.width; ++x) {
      const double u = x - shift;
      const int checker = (static_cast<int>(std::floor(u / 6)) + y / 6) % 2 == 0 ? 24 : -24;
      frame.at<cv::Vec3b>(y, x) = cv::Vec3b(cv::saturate_cast<uint8_t>(90 + 60.0 * y / size.height + checker),
                                            cv::saturate_cast<uint8_t>(110 + 50 * std::sin(u / 17.0) + checker),
                                            cv::saturate_cast<uint8_t>(140 - 40.0 * y / size.height + checker));
    }
  const cv::Point disc(size.width / 3, (size.height / 5 + index) % size.height);
  cv::circle(frame, disc, std::max(2, size.height / 8), cv::Scalar(200, 230, 250), cv::FILLED, cv::LINE_AA);
  return frame;
}

Expected<std::string> write_synthetic_clip(const std::string& path, cv::Size size, int frames, double fps,
                                           VideoCodec codec) {
  ClipWriterOptions options;
  options.codec = codec;
  options.nominal_fps = fps;
  auto writer = ClipWriter::create(path, size.width, size.height, options);
  if (!writer) return writer.error();
  for (int i = 0; i < frames; ++i)
    if (Status s = (*writer)->write(synthetic_frame(size, i), i / fps); !s) return s.error();
  if (Status s = (*writer)->finish(); !s) return s.error();
  return (*writer)->path();
}

Expected<DecodedClip> read_whole_clip(const std::string& path) {
  SourceOptions options;
  options.working_long_side = 0;
  DecodedClip clip;
  const ReadClip read = read_clip(path, options, [&](const DecodedFrame& frame) {
    clip.frames.push_back({frame.index, frame.t_s, frame.bgr.clone()});
  });
  if (read.error) return *read.error;
  clip.stream = read.facts;
  return clip;
}

double mean_relative_luminance(const cv::Mat& bgr) {
  cv::Mat y;
  relative_luminance(bgr, y);
  return cv::mean(y)[0];
}

bool same_pixels(const cv::Mat& a, const cv::Mat& b) {
  if (a.size() != b.size() || a.type() != b.type()) return false;
  cv::Mat diff;
  cv::absdiff(a, b, diff);
  return cv::countNonZero(diff.reshape(1)) == 0;
}

}  // namespace clipwarden::test
