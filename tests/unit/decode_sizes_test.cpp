// Working-size arithmetic, natural frame order, the silent-tail detector
// and the truncation checks of analyzer/decode. Expected values follow from
// the definitions in the headers (our own contract); the container layouts
// used for truncation are from ISO/IEC 14496-12 section 4.2 (box header),
// the RIFF chunk layout (Microsoft RIFF spec, 1991), RFC 8794 (EBML) and the
// GIF89a specification (trailer 0x3B) - recalled from memory.
#include <gtest/gtest.h>

#include <cmath>
#include <cstring>

#include "analyzer/decode/audio_track.h"
#include "analyzer/decode/frame_scaler.h"
#include "analyzer/decode/image_sources.h"
#include "analyzer/decode/truncation.h"

using namespace clipwarden::decode;

TEST(WorkingSize, LongSideBecomesTheTargetAndAspectIsKept) {
  EXPECT_EQ(working_size(1920, 1080, 512), cv::Size(512, 288));
  EXPECT_EQ(working_size(1080, 1920, 512), cv::Size(288, 512));
  EXPECT_EQ(working_size(160, 120, 512), cv::Size(512, 384));  // upscaling keeps the rule
  EXPECT_EQ(working_size(640, 640, 512), cv::Size(512, 512));
}

TEST(WorkingSize, OddSizesAreKeptAndRounded) {
  EXPECT_EQ(working_size(1279, 719, 512), cv::Size(512, 288));  // 287.8 -> 288
  EXPECT_EQ(working_size(333, 111, 100), cv::Size(100, 33));    // 33.33 -> 33
  EXPECT_EQ(working_size(101, 75, 0), cv::Size(101, 75));       // 0 = native, odd kept
  EXPECT_EQ(working_size(5000, 3, 512), cv::Size(512, 1));      // never below 1 px
}

TEST(WorkingSize, PixelAspectWidensTheDisplay) {
  EXPECT_EQ(display_width(720, 16, 11), 1047);  // 720 * 16 / 11 = 1047.27
  EXPECT_EQ(display_width(720, 1, 1), 720);
  EXPECT_EQ(display_width(720, 0, 1), 720);  // unknown aspect: as stored
}

TEST(NaturalOrder, NumbersCompareByValue) {
  EXPECT_TRUE(natural_less("f2.png", "f10.png"));
  EXPECT_FALSE(natural_less("f10.png", "f2.png"));
  EXPECT_TRUE(natural_less("frame_0009.png", "frame_0010.png"));
  EXPECT_TRUE(natural_less("a9.png", "b1.png"));
  EXPECT_TRUE(natural_less("shot1_f9.jpg", "shot1_f10.jpg"));
  EXPECT_TRUE(natural_less("shot1_f99.jpg", "shot2_f1.jpg"));
  EXPECT_FALSE(natural_less("f7.png", "f7.png"));
}

namespace {
std::vector<float> tone_then_silence(int rate, double tone_s, double silence_s, float amplitude) {
  std::vector<float> samples;
  const int tone = static_cast<int>(tone_s * rate), quiet = static_cast<int>(silence_s * rate);
  for (int i = 0; i < tone; ++i)
    samples.push_back(amplitude * static_cast<float>(std::sin(2 * M_PI * 440.0 * i / rate)));
  samples.insert(samples.end(), quiet, 0.0f);
  return samples;
}
}  // namespace

TEST(SilenceTail, FindsTheStartOfATrailingSilence) {
  const auto samples = tone_then_silence(48000, 2.5, 2.5, 0.5f);
  SilenceTail tail(48000);
  tail.add(samples.data(), static_cast<int64_t>(samples.size()));
  tail.finish();
  EXPECT_NEAR(tail.duration_s(), 5.0, 1e-9);
  ASSERT_TRUE(tail.silent_from_s());
  EXPECT_NEAR(*tail.silent_from_s(), 2.5, 1e-9);
}

TEST(SilenceTail, ShortOrQuietButAudibleTailsDoNotCount) {
  const auto short_gap = tone_then_silence(44100, 3.0, 0.8, 0.5f);  // under 1 s
  SilenceTail a(44100);
  a.add(short_gap.data(), static_cast<int64_t>(short_gap.size()));
  a.finish();
  EXPECT_FALSE(a.silent_from_s());
  // A sine of amplitude 0.01 has RMS 0.00707 = -43 dBFS: above -50 dBFS.
  const auto soft = tone_then_silence(44100, 3.0, 0.0, 0.01f);
  SilenceTail b(44100);
  b.add(soft.data(), static_cast<int64_t>(soft.size()));
  b.finish();
  EXPECT_FALSE(b.silent_from_s());
  // Amplitude 0.002: RMS 0.0014 = -57 dBFS, below the threshold: all silent.
  const auto faint = tone_then_silence(44100, 3.0, 0.0, 0.002f);
  SilenceTail c(44100);
  c.add(faint.data(), static_cast<int64_t>(faint.size()));
  c.finish();
  ASSERT_TRUE(c.silent_from_s());
  EXPECT_DOUBLE_EQ(*c.silent_from_s(), 0.0);
}

namespace {
struct MemoryFile final : FileBytes {
  std::vector<uint8_t> bytes;
  explicit MemoryFile(std::vector<uint8_t> b) : bytes(std::move(b)) { size = bytes.size(); }
  std::vector<uint8_t> read_at(uint64_t offset, size_t count) const override {
    if (offset >= bytes.size()) return {};
    const size_t n = std::min<size_t>(count, bytes.size() - offset);
    return {bytes.begin() + static_cast<std::ptrdiff_t>(offset),
            bytes.begin() + static_cast<std::ptrdiff_t>(offset + n)};
  }
};
void put_be32(std::vector<uint8_t>& b, uint32_t v) {
  for (int s = 24; s >= 0; s -= 8) b.push_back(static_cast<uint8_t>(v >> s));
}
void put_le32(std::vector<uint8_t>& b, uint32_t v) {
  for (int s = 0; s <= 24; s += 8) b.push_back(static_cast<uint8_t>(v >> s));
}
void put_text(std::vector<uint8_t>& b, const char* t) { b.insert(b.end(), t, t + std::strlen(t)); }
std::vector<uint8_t> boxes(uint32_t mdat_declared, size_t mdat_present) {
  std::vector<uint8_t> b;
  put_be32(b, 16);
  put_text(b, "ftypisom");
  put_be32(b, 0);
  put_be32(b, mdat_declared);
  put_text(b, "mdat");
  b.resize(b.size() + mdat_present, 0);
  return b;
}
}  // namespace

TEST(Truncation, IsoBoxesMustFitInTheFile) {
  EXPECT_FALSE(find_truncation(MemoryFile(boxes(108, 100))));
  const auto cut = find_truncation(MemoryFile(boxes(108, 60)));
  ASSERT_TRUE(cut);
  EXPECT_NE(cut->find("mdat box runs to byte 124"), std::string::npos) << *cut;
}

// Bytes after the last box that do not start a box (too few for a header,
// or a type that is not four printable characters) are stray data: a note,
// not a truncation. A printable type whose size runs past the end is still
// reported as a cut (the decoder's frame count then decides, libav_source).
TEST(Truncation, StrayBytesAfterTheLastBoxAreANoteNotACut) {
  auto whole = boxes(108, 100);
  EXPECT_FALSE(check_container(MemoryFile(whole)).trailing);
  auto few = whole;
  few.insert(few.end(), {0xff, 0xfe, 0x00});
  auto check = check_container(MemoryFile(few));
  EXPECT_FALSE(check.truncation);
  ASSERT_TRUE(check.trailing);
  EXPECT_NE(check.trailing->find("3 bytes after the last box (from byte 124)"), std::string::npos)
      << *check.trailing;
  auto binary = whole;
  binary.insert(binary.end(), {0x00, 0x00, 0x00, 0x10, 0xff, 0xfe, 0x00, 0x01, 's', 't'});
  check = check_container(MemoryFile(binary));
  EXPECT_FALSE(check.truncation);
  EXPECT_TRUE(check.trailing);
  auto text = whole;
  put_text(text, "hello, these bytes follow the last box");
  check = check_container(MemoryFile(text));
  ASSERT_TRUE(check.truncation);  // "hell" as a size, "o, t" as a type
  EXPECT_NE(check.truncation->find("o, t box"), std::string::npos) << *check.truncation;
}

TEST(Truncation, RiffChunkMustFitInTheFile) {
  std::vector<uint8_t> b;
  put_text(b, "RIFF");
  put_le32(b, 100);
  put_text(b, "AVI ");
  b.resize(108, 0);
  EXPECT_FALSE(find_truncation(MemoryFile(b)));
  b.resize(80);
  EXPECT_TRUE(find_truncation(MemoryFile(b)));
}

TEST(Truncation, MatroskaSegmentMustFitUnlessSizeIsUnknown) {
  // EBML header of 4 payload bytes, then a Segment of declared size 200.
  std::vector<uint8_t> b = {0x1A, 0x45, 0xDF, 0xA3, 0x84, 0,    0,  0,
                            0,    0x18, 0x53, 0x80, 0x67, 0x40, 200};
  b.resize(b.size() + 200, 0);
  EXPECT_FALSE(find_truncation(MemoryFile(b)));
  b.resize(150);
  EXPECT_TRUE(find_truncation(MemoryFile(b)));
  b[13] = 0x01;  // 8-byte size, all ones: unknown (live) size
  for (int i = 14; i < 21; ++i) b[i] = 0xFF;
  b.resize(60);
  EXPECT_FALSE(find_truncation(MemoryFile(b)));
}

TEST(Truncation, GifMustEndWithItsTrailer) {
  std::vector<uint8_t> b;
  put_text(b, "GIF89a");
  b.resize(40, 0);
  b.push_back(0x3B);
  EXPECT_FALSE(find_truncation(MemoryFile(b)));
  b.pop_back();
  EXPECT_TRUE(find_truncation(MemoryFile(b)));
}
