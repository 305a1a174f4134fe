// Facts about a clip's sound: codec, duration and whether it ends in
// silence. The audio is decoded from packets the video reader has already
// demuxed (no second pass over the file), downmixed to mono float.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "analyzer/decode/libav_util.h"
#include "clipwarden/report.h"

namespace clipwarden::decode {

// Silence threshold: a 100 ms window is silent when its RMS is below
// -50 dBFS, i.e. RMS < 10^(-50/20) = 0.00316 of full scale (full-scale
// square wave = 0 dBFS; a full-scale sine is -3 dBFS). A clip's sound has a
// silent tail when its last windows are all silent for at least 1 s; the
// tail starts at the first of them. -50 dBFS is well under speech and music
// levels and above dithered digital silence (common practice).
inline constexpr double kSilenceRmsDbfs = -50.0;
inline constexpr double kSilenceWindowS = 0.1;
inline constexpr double kSilentTailMinS = 1.0;

// RMS of 100 ms windows of mono samples, keeping only what the silent tail
// needs: constant memory whatever the length.
class SilenceTail {
 public:
  explicit SilenceTail(int sample_rate);
  void add(const float* samples, int64_t count);
  // Closes a last partial window. Call once after the last add().
  void finish();
  double duration_s() const { return static_cast<double>(total_samples_) / sample_rate_; }
  // Seconds from the first sample to the start of a silent tail of at least
  // 1 s, or nothing.
  std::optional<double> silent_from_s() const;

 private:
  void close_window();

  int sample_rate_;
  int64_t window_samples_;
  int64_t total_samples_ = 0;
  int64_t window_start_ = 0;
  int64_t in_window_ = 0;
  double sum_squares_ = 0;
  std::optional<int64_t> quiet_since_;  // first sample of the trailing silent run
};

// Decodes one audio stream packet by packet (single-threaded; audio costs
// little next to video) and measures its duration and silent tail.
class AudioTrack {
 public:
  // Opens the decoder for `stream`. Without a decoder (unknown codec) the
  // facts come from the container only.
  explicit AudioTrack(const AVStream* stream);
  int stream_index() const { return stream_index_; }

  // Decodes one packet of this stream. Undecodable packets are skipped.
  void add_packet(const AVPacket& packet);
  // Flushes the decoder and returns present/codec/duration/silent tail.
  AudioInfo finish();

 private:
  void drain(bool flushing);
  void resample(const AVFrame* frame);

  int stream_index_;
  std::string codec_name_;
  std::optional<double> container_duration_s_;
  CodecPtr decoder_;
  SwrPtr resampler_;
  FramePtr frame_;
  std::optional<SilenceTail> tail_;
  std::vector<float> mono_;  // resampler output, grown as needed
  bool finished_ = false;
  AudioInfo result_;
};

}  // namespace clipwarden::decode
