// The clip writer (analyzer/encode/clip_writer.h) against outside readers: ffprobe
// says how many frames the written file holds and when each is shown
// (best_effort_timestamp_time); our decoder must agree with it and with the
// times we wrote. FFV1 must decode to the exact input pixels.
#include <gtest/gtest.h>

#include <filesystem>

#include <opencv2/imgproc.hpp>

#include "support/clips.h"
#include "support/inject_clips.h"

using namespace clipwarden;
namespace ft = clipwarden::test;

namespace {

// Irregular times: 25 fps with a gap of two missing frames and a late frame.
std::vector<double> irregular_times() {
  std::vector<double> t;
  for (int i = 0; i < 20; ++i) t.push_back(i * 0.04);
  for (int i = 23; i < 30; ++i) t.push_back(i * 0.04);
  t.push_back(1.5);
  return t;
}

Expected<std::string> write_clip(const std::string& path, VideoCodec codec, cv::Size size,
                                 const std::vector<double>& times, int crf = 18) {
  ClipWriterOptions options;
  options.codec = codec;
  options.nominal_fps = 25;
  options.crf = crf;
  auto writer = ClipWriter::create(path, size.width, size.height, options);
  if (!writer) return writer.error();
  for (size_t i = 0; i < times.size(); ++i)
    if (Status s = (*writer)->write(ft::synthetic_frame(size, static_cast<int>(i)), times[i]); !s) return s.error();
  if (Status s = (*writer)->finish(); !s) return s.error();
  EXPECT_EQ((*writer)->frames_written(), static_cast<int64_t>(times.size()));
  return (*writer)->path();
}

void expect_times_agree(const std::string& path, const std::vector<double>& written, double tolerance_s) {
  const std::vector<double> probed = ft::ffprobe_frame_times(path);
  ASSERT_EQ(probed.size(), written.size()) << "ffprobe's frame count for " << path;
  auto decoded = ft::read_whole_clip(path);
  ASSERT_TRUE(decoded.ok()) << decoded.error().message();
  ASSERT_EQ(decoded->frames.size(), written.size()) << "our decoder's frame count";
  for (size_t i = 0; i < written.size(); ++i) {
    EXPECT_NEAR(probed[i] - probed[0], written[i], tolerance_s) << "ffprobe, frame " << i;
    EXPECT_NEAR(decoded->frames[i].t_s, probed[i] - probed[0], 1e-6) << "decoder vs ffprobe, frame " << i;
  }
  EXPECT_GE(decoded->stream.dropped_frames, 1) << "the two-frame gap is seen";
}

}  // namespace

TEST(ClipWriterReference, Ffv1KeepsTimesAndExactPixels) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffprobe");
  const ft::TempDir temp;
  const std::string dir = temp.path().string();
  const auto times = irregular_times();
  auto path = write_clip(dir + "/clip.mp4", VideoCodec::ffv1, {80, 48}, times);
  ASSERT_TRUE(path.ok()) << path.error().message();
  EXPECT_EQ(std::filesystem::path(*path).extension(), ".mkv") << "FFV1 goes into Matroska";
  expect_times_agree(*path, times, 0.0006);  // Matroska keeps milliseconds
  auto decoded = ft::read_whole_clip(*path);
  ASSERT_TRUE(decoded.ok());
  for (size_t i = 0; i < times.size(); ++i)
    EXPECT_TRUE(ft::same_pixels(decoded->frames[i].bgr, ft::synthetic_frame({80, 48}, static_cast<int>(i))))
        << "frame " << i;
}

TEST(ClipWriterReference, H264KeepsTimesAndQuality) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffprobe");
  if (!h264_encoder_available()) GTEST_SKIP() << "libav has no libx264 encoder";
  const ft::TempDir temp;
  const std::string dir = temp.path().string();
  const auto times = irregular_times();
  auto path = write_clip(dir + "/clip.mkv", VideoCodec::h264, {96, 64}, times);
  ASSERT_TRUE(path.ok()) << path.error().message();
  EXPECT_EQ(std::filesystem::path(*path).extension(), ".mp4") << "H.264 goes into MP4";
  expect_times_agree(*path, times, 1e-4);  // MP4 keeps the 1/90000 s clock
  auto decoded = ft::read_whole_clip(*path);
  ASSERT_TRUE(decoded.ok());
  // PSNR of the decoded frames against the input: at CRF 18 a clean
  // synthetic picture stays above 35 dB (OpenCV's cv::PSNR).
  for (size_t i = 0; i < times.size(); i += 7)
    EXPECT_GT(cv::PSNR(decoded->frames[i].bgr, ft::synthetic_frame({96, 64}, static_cast<int>(i))), 35.0)
        << "frame " << i;
}

TEST(ClipWriterReference, CrfTradesSizeForQualityAndOddSizesWork) {
  if (!h264_encoder_available()) GTEST_SKIP() << "libav has no libx264 encoder";
  const ft::TempDir temp;
  const std::string dir = temp.path().string();
  const std::vector<double> times = {0, 0.04, 0.08, 0.12, 0.16, 0.2};
  auto fine = write_clip(dir + "/fine.mp4", VideoCodec::h264, {96, 64}, times, 5);
  auto coarse = write_clip(dir + "/coarse.mp4", VideoCodec::h264, {96, 64}, times, 40);
  ASSERT_TRUE(fine.ok() && coarse.ok());
  EXPECT_GT(std::filesystem::file_size(*fine), std::filesystem::file_size(*coarse));
  auto odd = write_clip(dir + "/odd.mp4", VideoCodec::h264, {97, 63}, times);
  ASSERT_TRUE(odd.ok()) << odd.error().message();
  auto decoded = ft::read_whole_clip(*odd);
  ASSERT_TRUE(decoded.ok()) << decoded.error().message();
  ASSERT_EQ(decoded->frames.size(), times.size());
  EXPECT_EQ(decoded->frames[0].bgr.size(), cv::Size(97, 63));
}

TEST(ClipWriterReference, BadCallsAreErrorsNamingTheFile) {
  const ft::TempDir temp;
  const std::string dir = temp.path().string();
  ClipWriterOptions options;
  options.codec = VideoCodec::ffv1;
  auto missing_dir = ClipWriter::create(dir + "/no/such/folder/x.mkv", 32, 32, options);
  ASSERT_FALSE(missing_dir.ok());
  EXPECT_NE(missing_dir.error().message().find("x.mkv"), std::string::npos);
  auto writer = ClipWriter::create(dir + "/x.mkv", 32, 32, options);
  ASSERT_TRUE(writer.ok());
  EXPECT_FALSE((*writer)->write(cv::Mat(16, 16, CV_8UC3), 0).ok()) << "wrong size";
  EXPECT_TRUE((*writer)->write(cv::Mat(32, 32, CV_8UC3, cv::Scalar(1, 2, 3)), 0.1).ok());
  const Status backwards = (*writer)->write(cv::Mat(32, 32, CV_8UC3, cv::Scalar(1, 2, 3)), 0.05);
  ASSERT_FALSE(backwards.ok());
  EXPECT_NE(backwards.error().message().find("does not increase"), std::string::npos);
  writer->reset();  // never finished: nothing is left behind
  EXPECT_FALSE(std::filesystem::exists(dir + "/x.mkv"));
  EXPECT_TRUE(std::filesystem::is_empty(dir));
}
