// Bad inputs: every one gives an input Error, one line, naming the file and
// the cause, through both ClipSource (open + read) and probe_clip; nothing
// crashes or hangs. The broken files are made from good ffmpeg output.
#include <gtest/gtest.h>

#include <sys/stat.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <random>

#include "support/clips.h"
#include "support/decode_read.h"

using namespace clipwarden;
using namespace clipwarden::test;

namespace {

void write_bytes(const std::string& path, const std::string& bytes) {
  std::ofstream(path, std::ios::binary) << bytes;
}

std::string read_bytes(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

// The first `fraction` of a file, as a copy.
std::string cut_copy(const TempDir& dir, const std::string& whole, double fraction) {
  const std::string bytes = read_bytes(whole);
  const std::string cut = dir.file("cut_" + std::filesystem::path(whole).filename().string());
  write_bytes(cut,
              bytes.substr(0, static_cast<size_t>(static_cast<double>(bytes.size()) * fraction)));
  return cut;
}

std::string random_bytes(size_t n, unsigned seed) {
  std::mt19937 rng(seed);
  std::string bytes(n, '\0');
  for (char& c : bytes) c = static_cast<char>(rng() & 0xFF);
  return bytes;
}

// Both entry points fail with an input error that names `path`, in one
// line, and whose cause contains `cause`.
void expect_input_error(const std::string& path, const std::string& cause) {
  const ReadClip got = read_clip(path);
  ASSERT_TRUE(got.error) << path << " was read without error";
  EXPECT_EQ(got.error->kind, ErrorKind::input);
  const std::string message = got.error->message();
  EXPECT_EQ(message.find('\n'), std::string::npos) << message;
  EXPECT_EQ(got.error->subject, path) << message;
  EXPECT_NE(got.error->cause.find(cause), std::string::npos) << message;
  auto probed = probe_clip(path, {});
  ASSERT_FALSE(probed.ok()) << "probe read " << path;
  EXPECT_EQ(probed.error().kind, ErrorKind::input);
  EXPECT_EQ(probed.error().subject, path) << probed.error().message();
  EXPECT_NE(probed.error().cause.find(cause), std::string::npos) << probed.error().message();
}

std::string make(const TempDir& dir, const std::string& name, const std::vector<std::string>& extra,
                 const std::string& source = "testsrc2=size=160x120:rate=24:duration=3") {
  const std::string path = dir.file(name);
  EXPECT_EQ(make_lavfi_clip(path, source, extra), "");
  return path;
}

}  // namespace

TEST(DecodeBadInput, TruncatedFilesSayWhereTheyStop) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::vector<std::pair<std::string, std::vector<std::string>>> clips = {
      {"fast.mp4", {"-c:v", "libx264", "-movflags", "+faststart"}},
      {"v.webm", {"-c:v", "libvpx-vp9", "-deadline", "realtime", "-cpu-used", "8"}},
      {"v.avi", {"-c:v", "mpeg4"}},
      {"v.gif", {}},
  };
  for (const auto& [name, args] : clips) {
    const std::string whole = make(dir, name, args);
    ASSERT_FALSE(read_clip(whole).error) << name;
    const std::string cut = cut_copy(dir, whole, 0.6);
    SCOPED_TRACE(cut);
    expect_input_error(cut, "truncated after frame ");
    // The frames before the cut are still handed out first.
    EXPECT_GT(read_clip(cut).times_s.size(), 10u);
  }
}

TEST(DecodeBadInput, Mp4CutBeforeItsIndex) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  // Without +faststart the index (moov) comes last: the cut loses it.
  const std::string cut = cut_copy(dir, make(dir, "late_index.mp4", {"-c:v", "libx264"}), 0.6);
  expect_input_error(cut, "truncated: the file ends at byte");
}

TEST(DecodeBadInput, NotVideoFiles) {
  TempDir dir;
  const std::string empty = dir.file("empty.mp4"), noise = dir.file("noise.mp4"),
                    noise_bin = dir.file("noise.bin"), text = dir.file("notes.txt");
  write_bytes(empty, "");
  write_bytes(noise, random_bytes(20000, 1));
  write_bytes(noise_bin, random_bytes(20000, 2));
  write_bytes(text, "Shot list for the harbour sequence\nfog rolls in\n");
  expect_input_error(empty, "file is empty");
  expect_input_error(noise, "not a video file FFmpeg can read");
  expect_input_error(noise_bin, "not a video file FFmpeg can read");
  expect_input_error(text, "not a video file FFmpeg can read");
  expect_input_error(dir.file("missing.mp4"), "no such file");
}

TEST(DecodeBadInput, FilesWithoutVideo) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::string audio = make(dir, "tone.m4a", {"-c:a", "aac"}, "sine=duration=1");
  expect_input_error(audio, "no video stream (the file holds only audio)");
  const std::string subtitles = dir.file("lines.srt");
  write_bytes(subtitles, "1\n00:00:00,000 --> 00:00:01,000\nthe ferry leaves\n\n");
  expect_input_error(subtitles, "no video stream");
}

TEST(DecodeBadInput, UnreadableFile) {
  if (::geteuid() == 0) GTEST_SKIP() << "running as root: file permissions do not stop reading";
  TempDir dir;
  const std::string path = dir.file("locked.mp4");
  write_bytes(path, random_bytes(1000, 3));
  ::chmod(path.c_str(), 0);
  expect_input_error(path, "cannot read the file");
}

TEST(DecodeBadInput, HugeDeclaredFrameSize) {
  TempDir dir;
  // A YUV4MPEG2 header declaring 12000x12000 frames (144 Mpx), then noise.
  const std::string y4m = dir.file("huge.y4m");
  write_bytes(y4m,
              "YUV4MPEG2 W12000 H12000 F24:1 Ip A1:1 C420jpeg\nFRAME\n" + random_bytes(5000, 4));
  expect_input_error(y4m, "beyond the supported limit");
}

TEST(DecodeBadInput, EmptyFolderAndFolderWithoutFrames) {
  TempDir dir;
  const std::string empty = dir.file("no_frames");
  std::filesystem::create_directory(empty);
  expect_input_error(empty, "folder holds no PNG or JPEG frames");
  write_bytes(empty + "/readme.txt", "frames go here");
  expect_input_error(empty, "folder holds no PNG or JPEG frames");
}

TEST(DecodeBadInput, CorruptPacketMidStreamIsSkipped) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::string whole =
      make(dir, "whole.mp4", {"-c:v", "libx264", "-g", "24", "-movflags", "+faststart"});
  std::string bytes = read_bytes(whole);
  // Overwrite 300 bytes in the middle of the picture data (after the index).
  const size_t mdat = bytes.find("mdat");
  ASSERT_NE(mdat, std::string::npos);
  const size_t middle = mdat + (bytes.size() - mdat) / 2;
  bytes.replace(middle, 300, random_bytes(300, 5));
  const std::string damaged = dir.file("damaged.mp4");
  write_bytes(damaged, bytes);
  const ReadClip got = read_clip(damaged);
  EXPECT_FALSE(got.error) << got.error->message();
  // The decoder conceals or skips the damage and carries on to the end.
  EXPECT_GE(got.times_s.size(), 60u);
  EXPECT_NEAR(got.times_s.back(), 71.0 / 24, 0.2);
}

TEST(DecodeBadInput, NotARegularFile) {
  TempDir dir;
  // A named pipe would block a reader forever: refused before opening.
  const std::string pipe = dir.file("stream.mp4");
  ASSERT_EQ(::mkfifo(pipe.c_str(), 0600), 0);
  expect_input_error(pipe, "not a regular file or a folder of frames");
  expect_input_error("/dev/null", "not a regular file or a folder of frames");
}
