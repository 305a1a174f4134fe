// JPEG and PNG files from 8-bit OpenCV images, with libjpeg-turbo and
// libpng directly. OpenCV's image codecs module would do the same but loads
// about 80 more shared libraries (GDAL, HDF5, poppler, ...) at start-up,
// which cost every run of the CLI a fifth of a second and ~30 MB of RSS.
// The settings are the ones OpenCV's imencode uses by default, so pictures
// stay as they were.
#pragma once

#include <cstdint>
#include <optional>
#include <string>

#include <opencv2/core.hpp>

namespace clipwarden {

// Baseline JPEG of a BGR (CV_8UC3), BGRA (alpha dropped) or grey (CV_8UC1)
// image at `quality` 1..100 (libjpeg's scale: standard tables, 4:2:0
// chroma). Nothing for an empty image or another type.
std::optional<std::string> jpeg_file_bytes(const cv::Mat& image, int quality);

// PNG of a grey, BGR or BGRA 8-bit image (stored as grey, RGB or RGBA),
// tuned for speed: the Sub filter and zlib's fastest level with its RLE
// strategy. Nothing for an empty image or another type.
std::optional<std::string> png_file_bytes(const cv::Mat& image);

}  // namespace clipwarden
