// The in-memory clip reader (analyzer/decode/memory_source.h), which the
// decoder fuzz target uses: the same frames and facts as the file reader for
// the same bytes (our own contract: one reader behind two inputs), and bad
// bytes are errors. Clips are written by our ClipWriter (FFV1 is lossless, so
// the two readers must agree pixel for pixel).
#include <gtest/gtest.h>

#include <string>
#include <vector>

#include "analyzer/decode/libav_util.h"
#include "analyzer/decode/memory_source.h"
#include "clipwarden/clip_source.h"
#include "analyzer/encode/clip_writer.h"
#include "support/clips.h"

using namespace clipwarden;

namespace {

std::string write_moving_bar_clip(const test::TempDir& dir, VideoCodec codec, int frames) {
  ClipWriterOptions options;
  options.codec = codec;
  options.nominal_fps = 10;
  auto writer = ClipWriter::create(dir.file("bar.mkv"), 48, 32, options);
  EXPECT_TRUE(writer) << writer.error().message();
  for (int i = 0; i < frames; ++i) {
    cv::Mat frame(32, 48, CV_8UC3, cv::Scalar(40, 80, 120));
    frame.colRange(4 * i, 4 * i + 6).setTo(cv::Scalar(250, 250, 250));
    EXPECT_TRUE((*writer)->write(frame, i / 10.0));
  }
  EXPECT_TRUE((*writer)->finish());
  return (*writer)->path();
}

std::vector<uint8_t> file_bytes(const std::string& path) {
  std::vector<uint8_t> bytes;
  auto size = decode::read_file_bytes(path, bytes);
  EXPECT_TRUE(size) << size.error().message();
  bytes.resize(size ? *size : 0);
  return bytes;
}

std::vector<DecodedFrame> read_all(ClipSource& source) {
  std::vector<DecodedFrame> frames;
  for (;;) {
    DecodedFrame frame;
    auto more = source.read(frame);
    EXPECT_TRUE(more) << more.error().message();
    if (!more || *more == FrameRead::end_of_clip) return frames;
    frames.push_back(frame);
  }
}

}  // namespace

TEST(DecodeMemory, SameFramesAndFactsAsTheFileReader) {
  test::TempDir dir;
  for (VideoCodec codec : {VideoCodec::ffv1, VideoCodec::h264}) {
    if (codec == VideoCodec::h264 && !h264_encoder_available()) continue;
    SCOPED_TRACE(to_string(codec));
    const std::string path = write_moving_bar_clip(dir, codec, 6);
    SourceOptions options;
    options.working_long_side = 0;
    auto from_file = ClipSource::open(path, options);
    ASSERT_TRUE(from_file) << from_file.error().message();
    const auto bytes = file_bytes(path);
    auto from_memory = decode::open_memory_source(bytes.data(), bytes.size(), "bar", options);
    ASSERT_TRUE(from_memory) << from_memory.error().message();

    const auto file_frames = read_all(**from_file);
    const auto memory_frames = read_all(**from_memory);
    ASSERT_EQ(file_frames.size(), 6u);
    ASSERT_EQ(memory_frames.size(), file_frames.size());
    for (size_t i = 0; i < file_frames.size(); ++i) {
      EXPECT_DOUBLE_EQ(memory_frames[i].t_s, file_frames[i].t_s);
      EXPECT_EQ(cv::norm(memory_frames[i].bgr, file_frames[i].bgr, cv::NORM_INF), 0) << i;
    }
    const ClipInfo& a = (*from_file)->info();
    const ClipInfo& b = (*from_memory)->info();
    EXPECT_EQ(b.path, "bar");
    EXPECT_EQ(b.container, a.container);
    EXPECT_EQ(b.codec, a.codec);
    EXPECT_EQ(b.frame_count, a.frame_count);
    EXPECT_EQ(b.width, a.width);
    EXPECT_EQ(b.height, a.height);
    EXPECT_DOUBLE_EQ(b.duration_s, a.duration_s);
  }
}

TEST(DecodeMemory, EmptyAndGarbageBytesAreErrorsNamingTheInput) {
  SourceOptions options;
  auto empty = decode::open_memory_source(nullptr, 0, "nothing", options);
  ASSERT_FALSE(empty);
  EXPECT_EQ(empty.error().message(), "nothing: file is empty");
  const std::string garbage(300, '\x07');
  auto bad = decode::open_memory_source(reinterpret_cast<const uint8_t*>(garbage.data()),
                                        garbage.size(), "noise", options);
  ASSERT_FALSE(bad);
  EXPECT_EQ(bad.error().kind, ErrorKind::input);
  EXPECT_EQ(bad.error().subject, "noise");
}

// A concat list names other files; an in-memory clip may not reach them.
TEST(DecodeMemory, ListsNamingOtherFilesCannotOpenThem) {
  test::TempDir dir;
  const std::string path = write_moving_bar_clip(dir, VideoCodec::ffv1, 3);
  const std::string list = "ffconcat version 1.0\nfile '" + path + "'\n";
  auto source = decode::open_memory_source(reinterpret_cast<const uint8_t*>(list.data()),
                                           list.size(), "list", SourceOptions{});
  EXPECT_FALSE(source);
}

TEST(DecodeMemory, CutShortBytesEndInAnErrorOrFewerFramesNeverACrash) {
  test::TempDir dir;
  const auto bytes = file_bytes(write_moving_bar_clip(dir, VideoCodec::ffv1, 6));
  for (size_t keep : {bytes.size() / 4, bytes.size() / 2, bytes.size() - 7}) {
    auto source = decode::open_memory_source(bytes.data(), keep, "cut", SourceOptions{});
    if (!source) continue;
    DecodedFrame frame;
    int frames = 0;
    for (;;) {
      auto more = (*source)->read(frame);
      if (!more || *more == FrameRead::end_of_clip) break;
      ++frames;
    }
    EXPECT_LE(frames, 6) << keep;  // the tail may be index data only
  }
}
