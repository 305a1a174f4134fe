// Stream facts (ClipInfo.audio and StreamFacts) against FFmpeg: audio
// duration against ffprobe's stream duration, the silent tail against the
// silencedetect filter, dropped frames / VFR / repeated timestamps against
// the gaps and repeats in ffprobe's own list of frame times. Each clip is
// made by ffmpeg so that the truth is also known by construction.
#include <gtest/gtest.h>

#include <cmath>
#include <regex>

#include "support/clips.h"
#include "support/decode_read.h"

using namespace clipwarden;
using namespace clipwarden::test;

namespace {

SourceOptions small_frames() {
  SourceOptions options;
  options.working_long_side = 64;
  return options;
}

// silence_start of the last silence FFmpeg's silencedetect finds at the
// same threshold (-50 dB) and minimum length (1 s) as ours. silencedetect
// works on sample amplitudes, ours on 100 ms RMS windows: they agree to a
// window.
std::optional<double> ffmpeg_silence_start(const std::string& clip) {
  const CommandResult r = run_command({"ffmpeg", "-nostdin", "-v", "info", "-i", clip, "-vn", "-af",
                                       "silencedetect=n=-50dB:d=1", "-f", "null", "-"});
  std::optional<double> start;
  const std::regex pattern("silence_start: ([0-9.]+)");
  for (auto it = std::sregex_iterator(r.err.begin(), r.err.end(), pattern);
       it != std::sregex_iterator(); ++it)
    start = std::stod((*it)[1]);
  return start;
}

// Missing frames and repeats counted straight from ffprobe's frame times,
// with the nominal interval given by the test (the clip's known rate).
struct Gaps {
  int missing = 0;
  int repeats = 0;
};
Gaps gaps_in(const std::vector<double>& times, double interval_s) {
  Gaps g;
  for (size_t i = 1; i < times.size(); ++i) {
    const double d = times[i] - times[i - 1];
    if (d <= 0) ++g.repeats;
    if (d >= 1.5 * interval_s) g.missing += static_cast<int>(std::lround(d / interval_s)) - 1;
  }
  return g;
}

double duration_or(const std::string& text, double fallback) {
  try {
    return std::stod(text);
  } catch (const std::exception&) {
    return fallback;
  }
}

// 2 s of video with 5 s of sound: a 440 Hz tone for 2.5 s, then digital
// silence for 2.5 s.
std::string make_clip_with_long_audio(const TempDir& dir, const std::string& name,
                                      const std::string& audio_codec) {
  const std::string clip = dir.file(name);
  const std::string failed =
      make_lavfi_clip(clip, "testsrc2=size=160x120:rate=24:duration=2",
                      {"-f", "lavfi", "-i", "sine=frequency=440:sample_rate=48000:duration=2.5",
                       "-f", "lavfi", "-i", "anullsrc=r=48000:cl=mono", "-filter_complex",
                       "[2:a]atrim=duration=2.5[z];[1:a][z]concat=n=2:v=0:a=1[a]", "-map", "0:v",
                       "-map", "[a]", "-c:v", "libx264", "-c:a", audio_codec});
  EXPECT_EQ(failed, "");
  return clip;
}

void expect_long_audio_facts(const std::string& clip) {
  const ReadClip got = read_clip(clip, small_frames());
  ASSERT_FALSE(got.error) << got.error->message();
  ASSERT_TRUE(got.info.audio.present);
  EXPECT_EQ(got.info.audio.codec,
            ffprobe_value(clip, "stream=codec_name", {"-select_streams", "a:0"}));
  // Durations: within one AAC frame (1024 samples at 48 kHz = 21.3 ms) of
  // ffprobe's stream durations, and of the 5 s / 2 s of the construction.
  // Matroska keeps no per-stream duration (ffprobe: N/A): then the
  // construction's 5 s and 2 s are the reference.
  const double audio_s =
      duration_or(ffprobe_value(clip, "stream=duration", {"-select_streams", "a:0"}), 5.0);
  const double video_s = duration_or(ffprobe_value(clip, "stream=duration"), 2.0);
  constexpr double kFrameTolerance_s = 1024.0 / 48000 + 1e-3;
  ASSERT_TRUE(got.info.audio.duration_s);
  EXPECT_NEAR(*got.info.audio.duration_s, audio_s, kFrameTolerance_s);
  EXPECT_NEAR(*got.info.audio.duration_s, 5.0, kFrameTolerance_s);
  ASSERT_TRUE(got.facts.audio_duration_s && got.facts.mismatch_s);
  // Video duration: to one 1 ms Matroska tick (the last frame's duration is
  // stored rounded to the tick).
  EXPECT_NEAR(got.facts.video_duration_s, video_s, 1.001e-3);
  EXPECT_NEAR(*got.facts.mismatch_s, std::abs(audio_s - video_s), kFrameTolerance_s);
  // The silent tail starts where the tone stops (2.5 s), as silencedetect
  // finds it, within one 100 ms window.
  const auto reference = ffmpeg_silence_start(clip);
  ASSERT_TRUE(reference) << "silencedetect found no silence";
  ASSERT_TRUE(got.info.audio.silent_from_s);
  EXPECT_NEAR(*got.info.audio.silent_from_s, *reference, 0.1);
  EXPECT_NEAR(*got.info.audio.silent_from_s, 2.5, 0.1);
  // probe decodes the same audio from packets: the same answers.
  auto probed = probe_clip(clip, {});
  ASSERT_TRUE(probed.ok()) << probed.error().message();
  EXPECT_NEAR((*probed)["audio"]["silent_from_s"].get<double>(), *got.info.audio.silent_from_s,
              1e-9);
  EXPECT_NEAR((*probed)["stream"]["mismatch_s"].get<double>(), *got.facts.mismatch_s, 1e-9);
}

}  // namespace

TEST(DecodeStreamFacts, LongerAudioWithSilentTailAac) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  expect_long_audio_facts(make_clip_with_long_audio(dir, "av.mp4", "aac"));
}

TEST(DecodeStreamFacts, LongerAudioWithSilentTailPcmInMatroska) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  expect_long_audio_facts(make_clip_with_long_audio(dir, "av.mkv", "pcm_s16le"));
}

TEST(DecodeStreamFacts, AudibleToTheEndHasNoSilentTail) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::string clip = dir.file("tone.mp4");
  ASSERT_EQ(make_lavfi_clip(clip, "testsrc2=size=160x120:rate=24:duration=2",
                            {"-f", "lavfi", "-i", "sine=frequency=300:sample_rate=44100:duration=2",
                             "-c:v", "libx264", "-c:a", "aac"}),
            "");
  const ReadClip got = read_clip(clip, small_frames());
  ASSERT_FALSE(got.error) << got.error->message();
  EXPECT_FALSE(got.info.audio.silent_from_s);
  EXPECT_FALSE(ffmpeg_silence_start(clip));
  ASSERT_TRUE(got.facts.mismatch_s);
  EXPECT_LT(*got.facts.mismatch_s, 0.03);
}

TEST(DecodeStreamFacts, EveryTenthFrameDropped) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::string clip = dir.file("drops.mp4");
  // 72 frames at 24 fps; frames 9, 19, ..., 69 removed, the others keep
  // their times (passthrough): 7 gaps of two intervals.
  ASSERT_EQ(make_lavfi_clip(clip, "testsrc2=size=160x120:rate=24:duration=3",
                            {"-vf", "select='not(eq(mod(n\\,10)\\,9))'", "-vsync", "passthrough",
                             "-c:v", "libx264"}),
            "");
  const std::vector<double> times = ffprobe_frame_times(clip);
  const Gaps expected = gaps_in(times, 1.0 / 24);
  EXPECT_EQ(expected.missing, 7);  // the construction, seen by ffprobe
  const ReadClip got = read_clip(clip, small_frames());
  ASSERT_FALSE(got.error) << got.error->message();
  EXPECT_EQ(got.times_s.size(), times.size());
  EXPECT_EQ(got.facts.dropped_frames, expected.missing);
  EXPECT_TRUE(got.facts.vfr);
  EXPECT_EQ(got.facts.duplicate_timestamps, 0);
  auto probed = probe_clip(clip, {});
  ASSERT_TRUE(probed.ok());
  EXPECT_EQ((*probed)["stream"]["dropped_frames"].get<int>(), expected.missing);
}

TEST(DecodeStreamFacts, RepeatedTimestamp) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::string clean = dir.file("clean.mkv"), repeated = dir.file("repeated.mkv");
  ASSERT_EQ(make_lavfi_clip(clean, "testsrc2=size=160x120:rate=10:duration=2", {"-c:v", "mjpeg"}),
            "");
  // Stream copy with the setts bitstream filter: frame 4 takes frame 3's
  // time (Matroska accepts equal timestamps); frame 4's own slot is empty.
  const CommandResult r =
      run_command({"ffmpeg", "-nostdin", "-v", "error", "-y", "-i", clean, "-c", "copy", "-bsf:v",
                   "setts=ts='if(eq(N,4),PREV_INPTS,PTS)'", repeated});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const Gaps expected = gaps_in(ffprobe_frame_times(repeated), 0.1);
  EXPECT_EQ(expected.repeats, 1);
  const ReadClip got = read_clip(repeated, small_frames());
  ASSERT_FALSE(got.error) << got.error->message();
  EXPECT_EQ(got.facts.duplicate_timestamps, expected.repeats);
  EXPECT_EQ(got.facts.dropped_frames, expected.missing);
}
