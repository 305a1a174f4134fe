#include "analyzer/decode/libav_source.h"

#include <algorithm>
#include <cmath>
#include <optional>
#include <vector>

extern "C" {
#include <libavutil/pixdesc.h>
}

#include "analyzer/decode/audio_track.h"
#include "analyzer/decode/frame_scaler.h"
#include "analyzer/decode/stream_timing.h"
#include "analyzer/decode/truncation.h"

namespace clipwarden::decode {
namespace {

// Undecodable packets in a row before we give up on the stream: enough to
// ride out a damaged stretch up to the next keyframe of a typical GOP.
constexpr int kMaxFailuresInARow = 300;

bool valid_rate(AVRational r) { return r.num > 0 && r.den > 0; }

// The sample count of an MP4/MOV index (stsz), else 0. Other containers'
// counts are not a promise of decodable frames: an AVI index lists
// zero-size "drop" chunks (opencv-doc tree.avi lists 444, decodes 68).
int64_t index_frame_count(const AVFormatContext* format, int video_index) {
  const char* name = format->iformat ? format->iformat->name : "";
  return std::string(name).find("mp4") != std::string::npos ? format->streams[video_index]->nb_frames
                                                            : 0;
}

// Every frame an index lists was read (0 listed: no index to judge by).
bool frames_whole(int64_t listed, int64_t got) { return listed > 0 && got >= listed; }

std::optional<int64_t> known(int64_t ts) {
  return ts == AV_NOPTS_VALUE ? std::nullopt : std::optional<int64_t>(ts);
}

int64_t frame_duration(const AVFrame& frame) {
#if LIBAVUTIL_VERSION_INT >= AV_VERSION_INT(57, 30, 100)
  return frame.duration;
#else
  return frame.pkt_duration;
#endif
}

// Reads only the streams we use; the demuxer skips the others cheaply.
void discard_other_streams(AVFormatContext* format, int video_index, int audio_index) {
  for (unsigned i = 0; i < format->nb_streams; ++i)
    if (static_cast<int>(i) != video_index && static_cast<int>(i) != audio_index)
      format->streams[i]->discard = AVDISCARD_ALL;
}

int find_audio_stream(AVFormatContext* format, int video_index) {
  const int index = av_find_best_stream(format, AVMEDIA_TYPE_AUDIO, -1, video_index, nullptr, 0);
  return index >= 0 ? index : -1;
}

// Exact values once every frame is known: count, duration, average rate,
// and the audio facts beside the video's.
void settle(ClipInfo& info, StreamFacts& facts, int64_t frames, std::optional<AudioInfo> audio) {
  info.frame_count = frames;
  info.duration_s = facts.video_duration_s;
  if (facts.video_duration_s > 0) info.fps = static_cast<double>(frames) / facts.video_duration_s;
  if (!audio) return;
  info.audio = *audio;
  facts.audio_duration_s = audio->duration_s;
  if (audio->duration_s) facts.mismatch_s = std::abs(*audio->duration_s - facts.video_duration_s);
}

std::string with_av_reason(std::string cause, int code) {
  std::string reason = last_av_log_message();
  if (reason.empty() && code < 0) reason = av_error_text(code);
  if (!reason.empty()) cause += " (" + reason + ")";
  return cause;
}

class LibavSource final : public ClipSource {
 public:
  LibavSource(std::string path, FormatPtr format, int video_index, CodecPtr decoder, ClipInfo info,
              cv::Size output)
      : path_(std::move(path)),
        format_(std::move(format)),
        video_index_(video_index),
        decoder_(std::move(decoder)),
        packet_(av_packet_alloc()),
        frame_(av_frame_alloc()),
        scaler_(output, info.rotation),
        timing_(av_q2d(format_->streams[video_index]->time_base),
                stated_frame_interval_s(format_->streams[video_index])),
        info_(std::move(info)) {
    const int audio_index = find_audio_stream(format_.get(), video_index_);
    if (audio_index >= 0) audio_.emplace(format_->streams[audio_index]);
    discard_other_streams(format_.get(), video_index_, audio_index);
    ContainerCheck sizes = check_container(path_);
    truncation_ = std::move(sizes.truncation);
    if (sizes.trailing) notes_.push_back(*sizes.trailing);
  }

  bool allocated() const { return packet_ && frame_; }
  const ClipInfo& info() const override { return info_; }
  StreamFacts stream_facts() const override { return facts_; }
  std::vector<std::string> notes() const override { return notes_; }
  Expected<FrameRead> read(DecodedFrame& out) override;

 private:
  Expected<FrameRead> finish();
  int64_t listed_sample_count() const { return index_frame_count(format_.get(), video_index_); }
  Status feed_decoder();
  Status note_failure(int code);

  std::string path_;
  FormatPtr format_;
  int video_index_;
  CodecPtr decoder_;
  PacketPtr packet_;
  FramePtr frame_;
  FrameScaler scaler_;
  StreamTiming timing_;
  std::optional<AudioTrack> audio_;
  ClipInfo info_;
  StreamFacts facts_;
  int64_t frames_ = 0;
  bool draining_ = false;
  bool finished_ = false;
  std::optional<Error> end_error_;
  int read_error_ = 0;
  std::string read_error_reason_;
  std::optional<std::string> truncation_;  // the container's sizes say the file is cut short
  std::vector<std::string> notes_;
  int failures_in_a_row_ = 0;
  int decode_errors_ = 0;      // send/receive failures over the whole clip
  int concealed_frames_ = 0;   // frames output with damage concealed
  int64_t frame_packets_ = 0;  // video packets that should each give a frame
};

Expected<FrameRead> LibavSource::read(DecodedFrame& out) {
  if (finished_)
    return end_error_ ? Expected<FrameRead>(*end_error_)
                      : Expected<FrameRead>(FrameRead::end_of_clip);
  for (;;) {
    const int rc = avcodec_receive_frame(decoder_.get(), frame_.get());
    if (rc == 0) break;
    if (rc == AVERROR_EOF) return finish();
    if (rc != AVERROR(EAGAIN)) {
      if (auto failed = note_failure(rc); !failed) return failed.error();
      continue;
    }
    if (draining_) return finish();  // a decoder that never reports EOF
    if (auto fed = feed_decoder(); !fed) return fed.error();
  }
  failures_in_a_row_ = 0;
  // The decoder hid damage in this frame (error concealment) or marks it
  // as corrupt: it still comes out, and looks plausible, so it is counted.
  if (frame_->decode_error_flags != 0 || (frame_->flags & AV_FRAME_FLAG_CORRUPT))
    ++concealed_frames_;
  out.index = frames_++;
  out.t_s = timing_.add(known(frame_->best_effort_timestamp), frame_duration(*frame_));
  auto converted = scaler_.convert(*frame_, out.bgr, path_);
  av_frame_unref(frame_.get());
  if (!converted) return converted.error();
  return FrameRead::frame;
}

// Reads packets until one video packet went to the decoder (or the file
// ended); audio packets on the way go to the audio track.
Status LibavSource::feed_decoder() {
  for (;;) {
    clear_av_log_message();
    const int rc = av_read_frame(format_.get(), packet_.get());
    if (rc < 0) {
      if (rc != AVERROR_EOF) {
        read_error_ = rc;
        read_error_reason_ = last_av_log_message();
      }
      draining_ = true;
      avcodec_send_packet(decoder_.get(), nullptr);
      return Ok{};
    }
    const bool video = packet_->stream_index == video_index_;
    if (video) {
      // Packets that must come out as a frame: not empty (an AVI "drop"
      // chunk holds nothing) and not before an edit list's start.
      if (packet_->size > 0 && !(packet_->flags & AV_PKT_FLAG_DISCARD)) ++frame_packets_;
      const int sent = avcodec_send_packet(decoder_.get(), packet_.get());
      av_packet_unref(packet_.get());
      if (sent < 0 && sent != AVERROR(EAGAIN)) return note_failure(sent);
      return Ok{};
    }
    if (audio_ && packet_->stream_index == audio_->stream_index()) audio_->add_packet(*packet_);
    av_packet_unref(packet_.get());
  }
}

// A packet or frame that did not decode: skipped, unless the stream has
// stopped decoding altogether.
Status LibavSource::note_failure(int code) {
  ++decode_errors_;
  if (++failures_in_a_row_ < kMaxFailuresInARow) return Ok{};
  finished_ = true;
  end_error_ =
      input_error(path_, with_av_reason("cannot decode past frame " + std::to_string(frames_), code));
  return *end_error_;
}

Expected<FrameRead> LibavSource::finish() {
  finished_ = true;
  facts_ = timing_.facts();
  facts_.decode_errors = decode_errors_;
  facts_.concealed_frames = concealed_frames_;
  facts_.lost_frames = static_cast<int>(std::max<int64_t>(0, frame_packets_ - frames_));
  settle(info_, facts_, frames_,
         audio_ ? std::optional<AudioInfo>(audio_->finish()) : std::nullopt);
  // The sizes are a hint; the frames are the evidence: when every frame the
  // MP4 index lists came out, the file is whole whatever follows its boxes.
  if (truncation_ && frames_whole(listed_sample_count(), frames_)) {
    notes_.push_back("the container's sizes look cut short (" + *truncation_ + "), but all " +
                     std::to_string(frames_) + " frames its index lists decoded");
    truncation_.reset();
  }
  if (truncation_) {
    end_error_ = input_error(
        path_, "truncated after frame " + std::to_string(frames_) + " (" + *truncation_ + ")");
  } else if (read_error_ != 0) {
    std::string reason =
        read_error_reason_.empty() ? av_error_text(read_error_) : read_error_reason_;
    end_error_ = input_error(path_, "truncated or unreadable after frame " +
                                        std::to_string(frames_) + " (" + reason + ")");
  } else if (frames_ == 0) {
    end_error_ = input_error(path_, "no frame could be decoded");
  } else if (const int64_t listed = listed_sample_count();
             listed > 1 && frames_ * 2 < listed) {
    // A damaged index (e.g. bits flipped in an MP4's moov) can end the
    // demuxer early without any error: judging the few frames that came out
    // would pass a broken clip. Half leaves room for edit lists that hide
    // a few listed frames.
    end_error_ = input_error(path_, "only " + std::to_string(frames_) + " of the " +
                                        std::to_string(listed) +
                                        " frames the container lists could be decoded");
  }
  return end_error_ ? Expected<FrameRead>(*end_error_)
                    : Expected<FrameRead>(FrameRead::end_of_clip);
}

}  // namespace

double stated_frame_interval_s(const AVStream* stream) {
  if (valid_rate(stream->avg_frame_rate)) return 1.0 / av_q2d(stream->avg_frame_rate);
  if (valid_rate(stream->r_frame_rate)) return 1.0 / av_q2d(stream->r_frame_rate);
  return 0;
}

ClipInfo describe_container(const AVFormatContext* format, int video_index,
                            const std::string& path) {
  const AVStream* stream = format->streams[video_index];
  const AVCodecParameters* par = stream->codecpar;
  ClipInfo info;
  info.path = path;
  info.container = format->iformat->name;
  info.codec = avcodec_get_name(par->codec_id);
  const auto* pixel = av_pix_fmt_desc_get(static_cast<AVPixelFormat>(par->format));
  info.pix_fmt = pixel ? pixel->name : "";
  info.bit_depth = pixel ? pixel->comp[0].depth : 8;
  info.rotation = stream_rotation_cw(stream);
  const AVRational sar = valid_rate(stream->sample_aspect_ratio) ? stream->sample_aspect_ratio
                                                                 : par->sample_aspect_ratio;
  const int shown_width = display_width(par->width, sar.num, sar.den);
  const bool quarter_turn = info.rotation == 90 || info.rotation == 270;
  info.width = quarter_turn ? par->height : shown_width;
  info.height = quarter_turn ? shown_width : par->height;

  const double interval = stated_frame_interval_s(stream);
  info.fps = interval > 0 ? 1.0 / interval : 0;
  if (stream->duration > 0 && stream->duration != AV_NOPTS_VALUE)
    info.duration_s = static_cast<double>(stream->duration) * av_q2d(stream->time_base);
  else if (format->duration > 0)
    info.duration_s = static_cast<double>(format->duration) / AV_TIME_BASE;
  info.frame_count =
      stream->nb_frames > 0 ? stream->nb_frames : std::llround(info.duration_s * info.fps);

  const int audio_index = av_find_best_stream(const_cast<AVFormatContext*>(format),
                                              AVMEDIA_TYPE_AUDIO, -1, video_index, nullptr, 0);
  if (audio_index >= 0) {
    const AVStream* audio = format->streams[audio_index];
    info.audio.present = true;
    info.audio.codec = avcodec_get_name(audio->codecpar->codec_id);
    if (audio->duration > 0 && audio->duration != AV_NOPTS_VALUE)
      info.audio.duration_s = static_cast<double>(audio->duration) * av_q2d(audio->time_base);
  }
  return info;
}

Expected<std::unique_ptr<ClipSource>> open_libav_source(const std::string& path,
                                                        const SourceOptions& options) {
  auto format = open_input(path);
  if (!format) return format.error();
  return open_libav_source(std::move(*format), path, options);
}

Expected<std::unique_ptr<ClipSource>> open_libav_source(FormatPtr format, const std::string& path,
                                                        const SourceOptions& options) {
  auto video_index = find_video_stream(format.get(), path);
  if (!video_index) return video_index.error();
  auto decoder = open_decoder(format->streams[*video_index], options.threads, path);
  if (!decoder) return decoder.error();
  ClipInfo info = describe_container(format.get(), *video_index, path);
  const cv::Size output = working_size(info.width, info.height, options.working_long_side);
  auto source = std::make_unique<LibavSource>(path, std::move(format), *video_index,
                                              std::move(*decoder), std::move(info), output);
  if (!source->allocated()) return Error{ErrorKind::internal, path, "out of memory"};
  return std::unique_ptr<ClipSource>(std::move(source));
}

Expected<std::pair<ClipInfo, StreamFacts>> probe_libav(const std::string& path) {
  auto format = open_input(path);
  if (!format) return format.error();
  auto video_index = find_video_stream(format->get(), path);
  if (!video_index) return video_index.error();
  AVFormatContext* fmt = format->get();
  const AVStream* video = fmt->streams[*video_index];
  ClipInfo info = describe_container(fmt, *video_index, path);
  const int audio_index = find_audio_stream(fmt, *video_index);
  std::optional<AudioTrack> audio;
  if (audio_index >= 0) audio.emplace(fmt->streams[audio_index]);
  discard_other_streams(fmt, *video_index, audio_index);

  // Every video packet is one frame; its time is its pts (dts if none).
  struct Stamp {
    std::optional<int64_t> ts;
    int64_t duration;
  };
  std::vector<Stamp> stamps;
  PacketPtr packet(av_packet_alloc());
  if (!packet) return Error{ErrorKind::internal, path, "out of memory"};
  int rc;
  clear_av_log_message();
  while ((rc = av_read_frame(fmt, packet.get())) >= 0) {
    if (packet->stream_index == *video_index && !(packet->flags & AV_PKT_FLAG_DISCARD))
      stamps.push_back(
          {known(packet->pts != AV_NOPTS_VALUE ? packet->pts : packet->dts), packet->duration});
    else if (audio && packet->stream_index == audio_index)
      audio->add_packet(*packet);
    av_packet_unref(packet.get());
    clear_av_log_message();
  }
  if (rc != AVERROR_EOF)
    return input_error(
        path,
        with_av_reason("truncated or unreadable after packet " + std::to_string(stamps.size()), rc));
  if (auto cut = find_truncation(path);
      cut && !frames_whole(index_frame_count(fmt, *video_index), static_cast<int64_t>(stamps.size())))
    return input_error(
        path, "truncated after frame " + std::to_string(stamps.size()) + " (" + *cut + ")");
  if (stamps.empty()) return input_error(path, "the video stream holds no frames");
  const bool all_stamped =
      std::all_of(stamps.begin(), stamps.end(), [](const Stamp& s) { return s.ts; });
  if (all_stamped)  // decode order -> presentation order
    std::stable_sort(stamps.begin(), stamps.end(),
                     [](const Stamp& a, const Stamp& b) { return *a.ts < *b.ts; });
  StreamTiming timing(av_q2d(video->time_base), stated_frame_interval_s(video));
  for (const Stamp& s : stamps) timing.add(s.ts, s.duration);
  StreamFacts facts = timing.facts();
  settle(info, facts, static_cast<int64_t>(stamps.size()),
         audio ? std::optional<AudioInfo>(audio->finish()) : std::nullopt);
  return std::make_pair(std::move(info), facts);
}

}  // namespace clipwarden::decode
