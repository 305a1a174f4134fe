// Frame folders and animated WebP against independent decoders: folder
// frames must equal OpenCV's imread of each file in natural numeric order;
// lossless animated WebP frames (written by ffmpeg's libwebp_anim encoder)
// must equal the PNG frames ffmpeg writes from the same lavfi source.
#include <gtest/gtest.h>

#include <algorithm>
#include <filesystem>
#include <fstream>

#include <opencv2/imgcodecs.hpp>
#include <opencv2/imgproc.hpp>

#include "support/clips.h"
#include "support/decode_read.h"

using namespace clipwarden;
using namespace clipwarden::test;

namespace {

double max_abs_difference(const cv::Mat& a, const cv::Mat& b) {
  if (a.size() != b.size() || a.type() != b.type()) return 1e9;
  double worst = 0;
  cv::minMaxLoc(cv::abs(a - b) + cv::abs(b - a), nullptr, &worst);
  return worst;
}

double mean_abs_difference(const cv::Mat& a, const cv::Mat& b) {
  cv::Mat diff;
  cv::absdiff(a, b, diff);
  return cv::mean(diff.reshape(1))[0];
}

// ffmpeg writes one image per frame: name_1.ext, name_2.ext, ... (no zero
// padding, so plain text order would put 10 before 2).
std::string write_frames(const TempDir& dir, const std::string& folder, const std::string& pattern,
                         int frames, const std::vector<std::string>& codec = {}, int rate = 12) {
  const std::string path = dir.file(folder);
  std::filesystem::create_directory(path);
  std::vector<std::string> extra = {"-frames:v", std::to_string(frames), "-start_number", "1"};
  if (pattern.find(".jpg") != std::string::npos) {
    // Moderate colours: averaging in YUV (our scaler) and in RGB (OpenCV on
    // imread's output) then differ only by rounding, not by clipping.
    extra.insert(extra.end(), {"-vf", "hue=s=0.4"});
  }
  extra.insert(extra.end(), codec.begin(), codec.end());
  EXPECT_EQ(make_lavfi_clip(path + "/" + pattern,
                            "testsrc2=size=160x120:rate=" + std::to_string(rate), extra),
            "");
  return path;
}

}  // namespace

TEST(DecodeImageSources, PngFolderInNaturalOrderEqualsImread) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::string folder = write_frames(dir, "png_frames", "shot_%d.png", 12);
  SourceOptions options;
  options.working_long_side = 0;
  options.folder_fps = 12;
  std::vector<double> differences;
  const ReadClip got = read_clip(folder, options, [&](const DecodedFrame& f) {
    const cv::Mat expected = cv::imread(folder + "/shot_" + std::to_string(f.index + 1) + ".png");
    differences.push_back(max_abs_difference(f.bgr, expected));
  });
  ASSERT_FALSE(got.error) << got.error->message();
  ASSERT_EQ(got.times_s.size(), 12u);
  for (size_t i = 0; i < differences.size(); ++i) {
    EXPECT_EQ(differences[i], 0.0) << "frame " << i;  // PNG is lossless: identical pixels
    EXPECT_NEAR(got.times_s[i], static_cast<double>(i) / 12.0, 1e-12);
  }
  EXPECT_EQ(got.info.frame_count, 12);
  EXPECT_EQ(got.info.width, 160);
  EXPECT_EQ(got.info.height, 120);
  EXPECT_NEAR(got.facts.video_duration_s, 1.0, 1e-12);
  auto probed = probe_clip(folder, options);
  ASSERT_TRUE(probed.ok()) << probed.error().message();
  EXPECT_EQ((*probed)["frame_count"].get<int>(), 12);
  EXPECT_EQ((*probed)["container"].get<std::string>(), "image_folder");
}

TEST(DecodeImageSources, JpegFolderAtWorkingSize) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const int count = 11;
  const std::string folder = write_frames(dir, "jpg_frames", "f%d.jpg", count, {"-q:v", "2"});
  std::vector<cv::Mat> expected;
  for (int i = 1; i <= count; ++i) {
    cv::Mat image = cv::imread(folder + "/f" + std::to_string(i) + ".jpg");
    cv::resize(image, image, cv::Size(80, 60), 0, 0, cv::INTER_AREA);
    expected.push_back(image);
  }
  SourceOptions options;
  options.working_long_side = 80;                // default folder rate: 24 fps
  std::vector<std::vector<double>> differences;  // ours[k] against every expected frame
  const ReadClip got = read_clip(folder, options, [&](const DecodedFrame& f) {
    differences.emplace_back();
    for (const cv::Mat& e : expected) differences.back().push_back(mean_abs_difference(f.bgr, e));
  });
  ASSERT_FALSE(got.error) << got.error->message();
  ASSERT_EQ(differences.size(), static_cast<size_t>(count));
  for (int k = 0; k < count; ++k) {
    const auto& d = differences[k];
    // In order: frame k is closest to file k+1 ...
    EXPECT_EQ(std::min_element(d.begin(), d.end()) - d.begin(), k) << "frame " << k;
    // ... and close in value: two JPEG decoders (FFmpeg's, libjpeg via
    // OpenCV) and two area filters differ in chroma upsampling and
    // rounding by about 2 levels on average; tolerance 3.
    EXPECT_LT(d[k], 3.0) << "frame " << k;
  }
  EXPECT_NEAR(got.times_s.back(), 10.0 / 24.0, 1e-12);
}

TEST(DecodeImageSources, FolderFrameOfAnotherSizeIsNamed) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::string folder = write_frames(dir, "mixed", "f%d.png", 4);
  const std::string odd_one = folder + "/f5.png";
  ASSERT_EQ(make_lavfi_clip(odd_one, "testsrc2=size=100x80", {"-frames:v", "1"}), "");
  const ReadClip got = read_clip(folder);
  ASSERT_TRUE(got.error);
  EXPECT_EQ(got.error->kind, ErrorKind::input);
  EXPECT_EQ(got.error->subject, odd_one);
  EXPECT_NE(got.error->cause.find("differs from the first frame's 160x120"), std::string::npos)
      << got.error->message();
  EXPECT_EQ(got.times_s.size(), 4u);  // the frames before it were read
}

TEST(DecodeImageSources, LosslessAnimatedWebpEqualsSourceFrames) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::string webp = dir.file("anim.webp");
  ASSERT_EQ(
      make_lavfi_clip(webp, "testsrc2=size=160x120:rate=10:duration=1.5",
                      {"-c:v", "libwebp_anim", "-lossless", "1", "-pix_fmt", "bgra", "-loop", "0"}),
      "");
  const std::string folder = write_frames(dir, "source", "s%d.png", 15, {}, 10);
  SourceOptions options;
  options.working_long_side = 0;
  std::vector<double> differences;
  const ReadClip got = read_clip(webp, options, [&](const DecodedFrame& f) {
    const cv::Mat expected = cv::imread(folder + "/s" + std::to_string(f.index + 1) + ".png");
    differences.push_back(max_abs_difference(f.bgr, expected));
  });
  ASSERT_FALSE(got.error) << got.error->message();
  ASSERT_EQ(got.times_s.size(), 15u);
  for (size_t i = 0; i < differences.size(); ++i) EXPECT_EQ(differences[i], 0.0) << "frame " << i;
  // 10 fps: every frame lasts 100 ms in the WebP container.
  for (size_t i = 0; i < got.times_s.size(); ++i) EXPECT_NEAR(got.times_s[i], i * 0.1, 1e-9);
  EXPECT_EQ(got.info.container, "webp");
  EXPECT_FALSE(got.facts.vfr);
  EXPECT_NEAR(got.facts.video_duration_s, 1.5, 1e-9);
}
