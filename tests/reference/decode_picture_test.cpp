// The pictures ClipSource hands out, against FFmpeg: per-frame mean luma
// against the signalstats filter's YAVG (computed by FFmpeg on the decoded
// Y plane), and the display rotation against ffmpeg's own autorotation.
#include <gtest/gtest.h>

#include <cmath>
#include <fstream>

#include <opencv2/imgproc.hpp>

#include "support/clips.h"
#include "support/decode_read.h"

using namespace clipwarden;
using namespace clipwarden::test;

namespace {

// Mean limited-range BT.601 luma of a BGR frame: Y = 16 + 219/255 *
// (0.299 R + 0.587 G + 0.114 B) (ITU-R BT.601 section 2.5). Our decoder
// uses BT.601 for untagged clips below 720 lines, so this inverts its
// YUV->RGB step for the luma exactly, up to 8-bit rounding and the
// clipping of out-of-gamut colours.
double mean_bt601_luma(const cv::Mat& bgr) {
  const cv::Scalar m = cv::mean(bgr);
  return 16.0 + 219.0 / 255.0 * (0.299 * m[2] + 0.587 * m[1] + 0.114 * m[0]);
}

// Per-frame |our luma - YAVG| stays within `tolerance` (8-bit levels).
// yavg_scale converts YAVG to 8-bit levels (1/4 for 10-bit sources).
void expect_luma_matches_signalstats(const std::string& clip, double yavg_scale, double tolerance) {
  const std::vector<double> yavg =
      ffmpeg_frame_metadata(clip, "signalstats", "lavfi.signalstats.YAVG");
  ASSERT_FALSE(yavg.empty()) << "ffmpeg signalstats gave nothing for " << clip;
  std::vector<double> ours;
  SourceOptions native;
  native.working_long_side = 0;  // native size: no resampling between us and the Y plane
  const ReadClip got = read_clip(
      clip, native, [&](const DecodedFrame& f) { ours.push_back(mean_bt601_luma(f.bgr)); });
  ASSERT_FALSE(got.error) << got.error->message();
  ASSERT_EQ(ours.size(), yavg.size());
  double worst = 0;
  for (size_t i = 0; i < ours.size(); ++i)
    worst = std::max(worst, std::abs(ours[i] - yavg[i] * yavg_scale));
  EXPECT_LE(worst, tolerance) << clip;
  ::testing::Test::RecordProperty("worst_luma_difference", std::to_string(worst));
  // The clip must actually vary, or the check would prove little.
  const auto [lo, hi] = std::minmax_element(yavg.begin(), yavg.end());
  EXPECT_GT((*hi - *lo) * yavg_scale, 5.0) << "luma barely changes in " << clip;
}

const char* kFadingSource = "testsrc2=size=160x120:rate=12:duration=2";

}  // namespace

// With moderately saturated colours no R, G or B value clips, and the luma
// survives YUV -> RGB -> luma up to 8-bit rounding, whose mean error over a
// frame is near 0: tolerance 0.1 of an 8-bit level.
TEST(DecodePicture, MeanLumaMatchesSignalstatsH264) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::string clip = dir.file("m.mp4");
  // testsrc2's colour bars and moving parts at 40 % saturation, faded in from black.
  ASSERT_EQ(make_lavfi_clip(clip, kFadingSource,
                            {"-vf", "hue=s=0.4,fade=t=in:st=0:d=1.5", "-c:v", "libx264", "-pix_fmt",
                             "yuv420p"}),
            "");
  expect_luma_matches_signalstats(clip, 1.0, 0.1);
}

// Fully saturated colours: after 4:2:0 chroma upsampling some pixels fall
// outside the RGB cube and clip at 0 or 255, which moves the recovered luma
// (mostly upwards in dark saturated areas). Measured up to 0.83 levels on
// this clip; tolerance 1.0.
TEST(DecodePicture, MeanLumaMatchesSignalstatsSaturatedColours) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::string clip = dir.file("s.mp4");
  ASSERT_EQ(
      make_lavfi_clip(clip, kFadingSource,
                      {"-vf", "fade=t=in:st=0:d=1.5", "-c:v", "libx264", "-pix_fmt", "yuv420p"}),
      "");
  expect_luma_matches_signalstats(clip, 1.0, 1.0);
}

TEST(DecodePicture, MeanLumaMatchesSignalstatsTenBit) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::string clip = dir.file("m10.mp4");
  ASSERT_EQ(make_lavfi_clip(clip, kFadingSource,
                            {"-vf", "hue=s=0.4,fade=t=in:st=0:d=1.5", "-c:v", "libx264", "-pix_fmt",
                             "yuv420p10le"}),
            "");
  // YAVG of a 10-bit source is in 0..1023 levels: divide by 4. Our frames
  // are 8-bit; rounding 10 to 8 bits averages out over a frame as well.
  expect_luma_matches_signalstats(clip, 0.25, 0.1);
}

// Real footage (MPEG-4 Part 2, natural colours, little clipping): measured
// 0.07 levels at worst; tolerance 0.2.
TEST(DecodePicture, MeanLumaMatchesSignalstatsOpencvFootage) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  CLIPWARDEN_SKIP_WITHOUT_DATA(clip, "Megamind.avi");
  expect_luma_matches_signalstats(clip, 1.0, 0.2);
}

namespace {

// Sets the first track header's transformation matrix (ISO/IEC 14496-12
// section 8.3.2: tkhd version 0, matrix after 40 bytes of fields; values
// 16.16 fixed point except the last column, 2.30) to a quarter turn
// clockwise, as phones write for portrait video: {0, 1, -1, 0}, with the
// translation that keeps the picture in place.
bool mark_rotated_90(const std::string& path, int height) {
  std::fstream file(path, std::ios::in | std::ios::out | std::ios::binary);
  std::string bytes((std::istreambuf_iterator<char>(file)), std::istreambuf_iterator<char>());
  const size_t tkhd = bytes.find("tkhd");
  if (tkhd == std::string::npos || bytes[tkhd + 4] != 0) return false;  // version 0 only
  const int32_t matrix[9] = {0, 0x10000, 0, -0x10000, 0, 0, height << 16, 0, 0x40000000};
  std::string packed;
  for (int32_t v : matrix)
    for (int s = 24; s >= 0; s -= 8)
      packed.push_back(static_cast<char>((static_cast<uint32_t>(v) >> s) & 0xFF));
  file.seekp(static_cast<std::streamoff>(tkhd + 4 + 40));
  file.write(packed.data(), static_cast<std::streamsize>(packed.size()));
  return static_cast<bool>(file);
}

// The first frame as ffmpeg shows it (autorotation on), BGR.
cv::Mat ffmpeg_first_frame(const std::string& clip, int width, int height, const TempDir& dir) {
  const std::string raw = dir.file("first.bgr");
  const CommandResult r =
      run_command({"ffmpeg", "-nostdin", "-v", "error", "-y", "-i", clip, "-frames:v", "1", "-f",
                   "rawvideo", "-pix_fmt", "bgr24", raw});
  if (r.exit_code != 0) return {};
  std::ifstream in(raw, std::ios::binary);
  cv::Mat frame(height, width, CV_8UC3);
  in.read(reinterpret_cast<char*>(frame.data), static_cast<std::streamsize>(frame.total() * 3));
  return in ? frame : cv::Mat();
}

}  // namespace

TEST(DecodePicture, RotationMetadataIsApplied) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::string clip = dir.file("portrait.mp4");
  // A white box in the top-left corner of a dark 160x120 picture.
  ASSERT_EQ(make_lavfi_clip(clip, "color=c=0x202020:size=160x120:rate=10:duration=1",
                            {"-vf", "drawbox=x=0:y=0:w=40:h=30:color=white:t=fill", "-c:v",
                             "libx264", "-pix_fmt", "yuv420p"}),
            "");
  ASSERT_TRUE(mark_rotated_90(clip, 120));
  // ffprobe reads the matrix as a display rotation of -90 degrees
  // (counter-clockwise convention), i.e. 90 degrees clockwise to show it.
  EXPECT_EQ(std::lround(std::stod(ffprobe_value(clip, "stream_side_data=rotation"))), -90);

  SourceOptions native;
  native.working_long_side = 0;
  cv::Mat first;
  const ReadClip got = read_clip(clip, native, [&](const DecodedFrame& f) {
    if (f.index == 0) first = f.bgr.clone();
  });
  ASSERT_FALSE(got.error) << got.error->message();
  EXPECT_EQ(got.info.rotation, 90);
  EXPECT_EQ(got.info.width, 120);  // displayed size: the sides swap
  EXPECT_EQ(got.info.height, 160);
  ASSERT_EQ(first.size(), cv::Size(120, 160));
  // Turned a quarter clockwise, the top-left box lands top-right.
  const double top_right = cv::mean(first(cv::Rect(120 - 30, 0, 30, 40)))[1];
  const double top_left = cv::mean(first(cv::Rect(0, 0, 30, 40)))[1];
  EXPECT_GT(top_right, 200);
  EXPECT_LT(top_left, 60);
  // And the whole picture matches ffmpeg's autorotated frame (different
  // scalers: allow 3 levels of mean absolute difference).
  const cv::Mat reference = ffmpeg_first_frame(clip, 120, 160, dir);
  ASSERT_FALSE(reference.empty());
  cv::Mat diff;
  cv::absdiff(first, reference, diff);
  EXPECT_LT(cv::mean(diff)[0], 3.0);

  // At a working size the long side is the height now.
  SourceOptions small;
  small.working_long_side = 64;
  cv::Size seen;
  read_clip(clip, small, [&](const DecodedFrame& f) { seen = f.bgr.size(); });
  EXPECT_EQ(seen, cv::Size(48, 64));
}

// Scaling to the working size against OpenCV's INTER_AREA (pixel-area
// resampling) of the same frames decoded at native size. Averaging in YUV
// (our scaler) and in RGB (OpenCV) differ by rounding and by the siting of
// the subsampled chroma: about 1 level on average for moderate colours,
// with no bias. A chroma or colour-matrix mistake would show as a bias of
// several levels in one channel.
TEST(DecodePicture, WorkingSizeMatchesOpencvAreaResize) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::string clip = dir.file("moderate.mp4");
  ASSERT_EQ(make_lavfi_clip(clip, "testsrc2=size=320x240:rate=12:duration=1",
                            {"-vf", "hue=s=0.4", "-c:v", "libx264", "-pix_fmt", "yuv420p"}),
            "");
  std::vector<cv::Mat> native, small;
  SourceOptions options;
  options.working_long_side = 0;
  read_clip(clip, options, [&](const DecodedFrame& f) { native.push_back(f.bgr.clone()); });
  for (int long_side : {160, 211}) {  // exactly half, and an odd size (211x158)
    small.clear();
    options.working_long_side = long_side;
    const ReadClip got =
        read_clip(clip, options, [&](const DecodedFrame& f) { small.push_back(f.bgr.clone()); });
    ASSERT_FALSE(got.error);
    ASSERT_EQ(small.size(), native.size());
    for (size_t i = 0; i < small.size(); ++i) {
      cv::Mat reference, diff, signed_diff;
      cv::resize(native[i], reference, small[i].size(), 0, 0, cv::INTER_AREA);
      cv::absdiff(small[i], reference, diff);
      cv::subtract(small[i], reference, signed_diff, cv::noArray(), CV_32F);
      const cv::Scalar mean_abs = cv::mean(diff), bias = cv::mean(signed_diff);
      for (int c = 0; c < 3; ++c) {
        EXPECT_LT(mean_abs[c], 1.5)
            << "long side " << long_side << " frame " << i << " channel " << c;
        EXPECT_LT(std::abs(bias[c]), 0.3)
            << "long side " << long_side << " frame " << i << " channel " << c;
      }
    }
  }
}

// Non-square pixels: the displayed width is the stored width times the
// sample aspect ratio, as ffprobe's display_aspect_ratio states.
TEST(DecodePicture, PixelAspectRatioWidensTheFrame) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::string clip = dir.file("anamorphic.mp4");
  ASSERT_EQ(make_lavfi_clip(clip, "testsrc2=size=160x120:rate=10:duration=1",
                            {"-vf", "setsar=2", "-c:v", "libx264"}),
            "");
  EXPECT_EQ(ffprobe_value(clip, "stream=display_aspect_ratio"), "8:3");
  SourceOptions options;
  options.working_long_side = 64;
  cv::Size seen;
  const ReadClip got =
      read_clip(clip, options, [&](const DecodedFrame& f) { seen = f.bgr.size(); });
  ASSERT_FALSE(got.error);
  EXPECT_EQ(got.info.width, 320);
  EXPECT_EQ(got.info.height, 120);
  EXPECT_EQ(seen, cv::Size(64, 24));  // 8:3
}
