#include "analyzer/decode/audio_track.h"

#include <algorithm>
#include <cmath>

extern "C" {
#include <libavutil/channel_layout.h>
#include <libavutil/opt.h>
}

namespace clipwarden::decode {

SilenceTail::SilenceTail(int sample_rate)
    : sample_rate_(sample_rate > 0 ? sample_rate : 48000),
      window_samples_(std::max<int64_t>(1, std::llround(sample_rate_ * kSilenceWindowS))) {}

void SilenceTail::add(const float* samples, int64_t count) {
  for (int64_t i = 0; i < count; ++i) {
    sum_squares_ += static_cast<double>(samples[i]) * samples[i];
    if (++in_window_ == window_samples_) close_window();
  }
  total_samples_ += count;
}

void SilenceTail::close_window() {
  static const double threshold = std::pow(10.0, kSilenceRmsDbfs / 20.0);
  const double rms = std::sqrt(sum_squares_ / static_cast<double>(in_window_));
  if (rms >= threshold)
    quiet_since_.reset();
  else if (!quiet_since_)
    quiet_since_ = window_start_;
  window_start_ += in_window_;
  in_window_ = 0;
  sum_squares_ = 0;
}

void SilenceTail::finish() {
  if (in_window_ > 0) close_window();
}

std::optional<double> SilenceTail::silent_from_s() const {
  if (!quiet_since_) return std::nullopt;
  const double start_s = static_cast<double>(*quiet_since_) / sample_rate_;
  if (duration_s() - start_s < kSilentTailMinS) return std::nullopt;
  return start_s;
}

AudioTrack::AudioTrack(const AVStream* stream)
    : stream_index_(stream->index),
      codec_name_(avcodec_get_name(stream->codecpar->codec_id)),
      frame_(av_frame_alloc()) {
  if (stream->duration > 0 && stream->duration != AV_NOPTS_VALUE)
    container_duration_s_ = static_cast<double>(stream->duration) * av_q2d(stream->time_base);
  const AVCodec* codec = avcodec_find_decoder(stream->codecpar->codec_id);
  if (!codec || !frame_) return;
  CodecPtr decoder(avcodec_alloc_context3(codec));
  if (!decoder || avcodec_parameters_to_context(decoder.get(), stream->codecpar) < 0) return;
  decoder->pkt_timebase = stream->time_base;
  decoder->thread_count = 1;
  if (avcodec_open2(decoder.get(), codec, nullptr) < 0) return;
  decoder_ = std::move(decoder);
}

void AudioTrack::add_packet(const AVPacket& packet) {
  if (!decoder_ || finished_) return;
  if (avcodec_send_packet(decoder_.get(), &packet) < 0) return;  // corrupt: skip it
  drain(false);
}

void AudioTrack::drain(bool flushing) {
  for (;;) {
    const int rc = avcodec_receive_frame(decoder_.get(), frame_.get());
    if (rc == AVERROR(EAGAIN) || rc == AVERROR_EOF) break;
    if (rc < 0) {
      if (flushing) break;  // a damaged frame; the rest may still decode
      continue;
    }
    resample(frame_.get());
    av_frame_unref(frame_.get());
  }
}

void AudioTrack::resample(const AVFrame* frame) {
  if (frame->sample_rate <= 0 || frame->nb_samples <= 0) return;
  if (!resampler_) {
    SwrContext* raw = nullptr;
    AVChannelLayout mono = AV_CHANNEL_LAYOUT_MONO;
    AVChannelLayout in_layout;
    if (frame->ch_layout.order == AV_CHANNEL_ORDER_UNSPEC)
      av_channel_layout_default(&in_layout, frame->ch_layout.nb_channels);
    else
      av_channel_layout_copy(&in_layout, &frame->ch_layout);
    // Same rate, mono float: swr's default downmix averages the channels.
    const int rc = swr_alloc_set_opts2(&raw, &mono, AV_SAMPLE_FMT_FLT, frame->sample_rate,
                                       &in_layout, static_cast<AVSampleFormat>(frame->format),
                                       frame->sample_rate, 0, nullptr);
    av_channel_layout_uninit(&in_layout);
    if (rc < 0 || swr_init(raw) < 0) {
      swr_free(&raw);
      decoder_.reset();  // cannot convert this layout: keep container facts only
      return;
    }
    resampler_.reset(raw);
    tail_.emplace(frame->sample_rate);
  }
  const int capacity = frame->nb_samples + 256;
  if (static_cast<int>(mono_.size()) < capacity) mono_.resize(capacity);
  uint8_t* out[1] = {reinterpret_cast<uint8_t*>(mono_.data())};
  const int converted =
      swr_convert(resampler_.get(), out, capacity,
                  const_cast<const uint8_t**>(frame->extended_data), frame->nb_samples);
  if (converted > 0) tail_->add(mono_.data(), converted);
}

AudioInfo AudioTrack::finish() {
  if (finished_) return result_;
  finished_ = true;
  if (decoder_ && avcodec_send_packet(decoder_.get(), nullptr) >= 0) drain(true);
  result_.present = true;
  result_.codec = codec_name_;
  result_.duration_s = container_duration_s_;
  if (tail_) {
    tail_->finish();
    // Decoders hand out the codec's padding at the end too (AAC: up to one
    // 1024-sample frame); the container's own duration excludes it, so the
    // shorter of the two is the sound's length. A stream cut short decodes
    // to less than its container says, and then the decoded length wins.
    const double decoded_s = tail_->duration_s();
    result_.duration_s =
        container_duration_s_ ? std::min(decoded_s, *container_duration_s_) : decoded_s;
    result_.silent_from_s = tail_->silent_from_s();
  }
  return result_;
}

}  // namespace clipwarden::decode
