// The page's and inspect's pictures are written with libjpeg and libpng
// directly (analyzer/encode/picture_encoding.h). Checked against OpenCV's
// image codecs on real pictures (opencv-doc examples/data): JPEG files are
// byte for byte what cv::imencode writes with the same quality, and PNG
// files decode (cv::imdecode) to exactly the pixels given.
#include <gtest/gtest.h>

#include <filesystem>
#include <initializer_list>

#include <opencv2/imgcodecs.hpp>
#include <opencv2/imgproc.hpp>

#include "analyzer/encode/picture_encoding.h"

using namespace clipwarden;

namespace {

const char* kData = "/usr/share/doc/opencv-doc/examples/data/";

// A real picture cut to an odd size (JPEG's 16x16 MCUs and PNG's rows both
// meet a partial block at the edges), or empty when opencv-doc is absent.
cv::Mat real_picture(const char* name, cv::Rect crop) {
  const std::string path = std::string(kData) + name;
  if (!std::filesystem::exists(path)) return {};
  const cv::Mat image = cv::imread(path, cv::IMREAD_COLOR);
  return image.empty() ? image : image(crop & cv::Rect(0, 0, image.cols, image.rows)).clone();
}

std::string opencv_jpeg(const cv::Mat& image, int quality) {
  std::vector<uint8_t> bytes;
  EXPECT_TRUE(cv::imencode(".jpg", image, bytes, {cv::IMWRITE_JPEG_QUALITY, quality}));
  return {bytes.begin(), bytes.end()};
}

cv::Mat decoded(const std::string& bytes, int flags) {
  return cv::imdecode(std::vector<uint8_t>(bytes.begin(), bytes.end()), flags);
}

bool same_pixels(const cv::Mat& a, const cv::Mat& b) {
  return a.size() == b.size() && a.type() == b.type() && cv::norm(a, b, cv::NORM_INF) == 0;
}

}  // namespace

TEST(PictureEncodingReference, JpegIsByteForByteOpenCvsImencode) {
  const cv::Mat fruits = real_picture("fruits.jpg", {13, 7, 333, 217});
  const cv::Mat baboon = real_picture("baboon.jpg", {0, 0, 161, 97});
  if (fruits.empty() || baboon.empty()) GTEST_SKIP() << "opencv-doc examples/data is not installed";
  cv::Mat grey, bgra;
  cv::cvtColor(fruits, grey, cv::COLOR_BGR2GRAY);
  cv::cvtColor(baboon, bgra, cv::COLOR_BGR2BGRA);
  for (int quality : {1, 45, 70, 95, 100})
    for (const cv::Mat* image :
         std::initializer_list<const cv::Mat*>{&fruits, &baboon, &grey, &bgra}) {
      const auto ours = jpeg_file_bytes(*image, quality);
      ASSERT_TRUE(ours.has_value());
      EXPECT_EQ(*ours, opencv_jpeg(*image, quality))
          << "quality " << quality << ", " << image->channels() << " channels";
    }
}

TEST(PictureEncodingReference, PngDecodesToTheSamePixels) {
  const cv::Mat fruits = real_picture("fruits.jpg", {5, 3, 251, 131});
  if (fruits.empty()) GTEST_SKIP() << "opencv-doc examples/data is not installed";
  cv::Mat grey, bgra, mask;
  cv::cvtColor(fruits, grey, cv::COLOR_BGR2GRAY);
  cv::cvtColor(fruits, bgra, cv::COLOR_BGR2BGRA);
  bgra.col(17).setTo(cv::Scalar(1, 2, 3, 0));  // a transparent column keeps its colour values
  cv::threshold(grey, mask, 128, 255, cv::THRESH_BINARY);  // like inspect's occlusion mask
  const cv::Mat view = fruits(cv::Rect(3, 4, 101, 55));    // not continuous in memory
  for (const cv::Mat* image :
       std::initializer_list<const cv::Mat*>{&fruits, &grey, &bgra, &mask, &view}) {
    const auto ours = png_file_bytes(*image);
    ASSERT_TRUE(ours.has_value());
    EXPECT_TRUE(same_pixels(decoded(*ours, cv::IMREAD_UNCHANGED), *image))
        << image->channels() << " channels";
  }
}

TEST(PictureEncodingReference, EmptyOrUnsupportedImagesGiveNothing) {
  EXPECT_FALSE(jpeg_file_bytes(cv::Mat(), 80).has_value());
  EXPECT_FALSE(png_file_bytes(cv::Mat()).has_value());
  const cv::Mat floats(8, 8, CV_32FC1, cv::Scalar(0.5));
  EXPECT_FALSE(jpeg_file_bytes(floats, 80).has_value());
  EXPECT_FALSE(png_file_bytes(floats).has_value());
  const cv::Mat two_channels(8, 8, CV_8UC2, cv::Scalar(1, 2));
  EXPECT_FALSE(jpeg_file_bytes(two_channels, 80).has_value());
  EXPECT_FALSE(png_file_bytes(two_channels).has_value());
}
