// Frame counts and per-frame times of ClipSource against ffprobe (FFmpeg's
// own reading of the same files), on opencv-doc footage and on small clips
// made by ffmpeg's lavfi sources. Tolerance for times: 1.5e-6 s, because
// ffprobe prints seconds with 6 decimals (each value off by up to 0.5e-6,
// a difference of two by up to 1e-6) and our times are relative to the
// first frame.
#include <gtest/gtest.h>

#include <cmath>

#include "support/clips.h"
#include "support/decode_read.h"

using namespace clipwarden;
using namespace clipwarden::test;

namespace {

constexpr double kTimeTolerance_s = 1.5e-6;

SourceOptions small_frames() {
  SourceOptions options;
  options.working_long_side = 64;  // timing does not depend on the picture size
  return options;
}

// Our frames' count and times equal ffprobe's best-effort timestamps;
// probe's packet count and the decoder's exact count agree with it too.
void expect_frames_match_ffprobe(const std::string& clip) {
  const std::vector<double> expected = ffprobe_frame_times(clip);
  ASSERT_FALSE(expected.empty()) << "ffprobe read no frames from " << clip;
  const ReadClip got = read_clip(clip, small_frames());
  ASSERT_FALSE(got.error) << got.error->message();
  ASSERT_EQ(got.times_s.size(), expected.size()) << clip;
  ASSERT_FALSE(std::isnan(expected[0]));
  for (size_t i = 0; i < expected.size(); ++i) {
    if (std::isnan(expected[i])) {  // ffprobe has no time: ours continues the sequence
      if (i > 0) EXPECT_GT(got.times_s[i], got.times_s[i - 1]) << clip << " frame " << i;
      continue;
    }
    ASSERT_NEAR(got.times_s[i], expected[i] - expected[0], kTimeTolerance_s)
        << clip << " frame " << i;
  }
  EXPECT_EQ(got.info.frame_count, static_cast<int64_t>(expected.size()));
  auto probed = probe_clip(clip, {});
  ASSERT_TRUE(probed.ok()) << probed.error().message();
  EXPECT_EQ((*probed)["frame_count"].get<int64_t>(), static_cast<int64_t>(expected.size())) << clip;
  // The container description is FFmpeg's own naming.
  EXPECT_EQ(got.info.codec, ffprobe_value(clip, "stream=codec_name"));
  EXPECT_EQ(got.info.container, ffprobe_value(clip, "format=format_name"));
}

std::string make_clip(const TempDir& dir, const std::string& name, const std::string& source,
                      const std::vector<std::string>& extra) {
  const std::string path = dir.file(name);
  const std::string failed = make_lavfi_clip(path, source, extra);
  EXPECT_EQ(failed, "") << "ffmpeg could not make " << name;
  return path;
}

const char* kSmallSource = "testsrc2=size=160x120:rate=24:duration=2";

}  // namespace

TEST(DecodeTimestamps, OpencvVtestAvi) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffprobe");
  CLIPWARDEN_SKIP_WITHOUT_DATA(clip, "vtest.avi");
  expect_frames_match_ffprobe(clip);
}

TEST(DecodeTimestamps, OpencvTreeAviWithIrregularTimestamps) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffprobe");
  CLIPWARDEN_SKIP_WITHOUT_DATA(clip, "tree.avi");
  expect_frames_match_ffprobe(clip);
  // tree.avi's frames are irregularly spaced (in ffprobe's listing its
  // intervals range from 5 to 11 ticks of 1/15 s).
  EXPECT_TRUE(read_clip(clip, small_frames()).facts.vfr);
}

TEST(DecodeTimestamps, OpencvMegamindAvi) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffprobe");
  CLIPWARDEN_SKIP_WITHOUT_DATA(clip, "Megamind.avi");
  expect_frames_match_ffprobe(clip);
}

TEST(DecodeTimestamps, H264Mp4WithBFrames) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const auto clip =
      make_clip(dir, "a.mp4", kSmallSource, {"-c:v", "libx264", "-bf", "3", "-pix_fmt", "yuv420p"});
  expect_frames_match_ffprobe(clip);
  const ReadClip got = read_clip(clip, small_frames());
  EXPECT_FALSE(got.facts.vfr);
  EXPECT_EQ(got.facts.dropped_frames, 0);
  EXPECT_NEAR(got.facts.video_duration_s, 2.0, 1e-6);
  EXPECT_NEAR(got.info.fps, 24.0, 1e-6);
}

TEST(DecodeTimestamps, Vp9Webm) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const auto clip =
      make_clip(dir, "a.webm", kSmallSource,
                {"-c:v", "libvpx-vp9", "-deadline", "realtime", "-cpu-used", "8", "-b:v", "200k"});
  expect_frames_match_ffprobe(clip);
  // 24 fps in Matroska's 1 ms ticks: intervals of 41 and 42 ms, not VFR.
  EXPECT_FALSE(read_clip(clip, small_frames()).facts.vfr);
}

TEST(DecodeTimestamps, AnimatedGif) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const auto clip = make_clip(dir, "a.gif", "testsrc2=size=160x120:rate=10:duration=2", {});
  expect_frames_match_ffprobe(clip);
}

TEST(DecodeTimestamps, TenBitH264) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const auto clip =
      make_clip(dir, "a10.mp4", kSmallSource, {"-c:v", "libx264", "-pix_fmt", "yuv420p10le"});
  expect_frames_match_ffprobe(clip);
  const ReadClip got = read_clip(clip, small_frames());
  EXPECT_EQ(got.info.bit_depth, 10);
  EXPECT_EQ(got.info.pix_fmt, ffprobe_value(clip, "stream=pix_fmt"));
}

TEST(DecodeTimestamps, VariableFrameRate) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  // Frame n at (n + 0.3 sin n) / 24 s: intervals between 0.71 and 1.29 of
  // 1/24 s, never a gap of 1.5 intervals. A microsecond time base in the
  // filter and 1 ms ticks in the encoder and in Matroska keep the variation.
  const auto clip =
      make_clip(dir, "vfr.mkv", "testsrc2=size=160x120:rate=24:duration=3",
                {"-vf", "settb=1/1000000,setpts='(N+0.3*sin(N))/(24*TB)'", "-vsync", "passthrough",
                 "-enc_time_base:v", "1:1000", "-c:v", "libx264", "-bf", "0"});
  expect_frames_match_ffprobe(clip);
  const ReadClip got = read_clip(clip, small_frames());
  EXPECT_TRUE(got.facts.vfr);
  EXPECT_EQ(got.facts.dropped_frames, 0);
}
