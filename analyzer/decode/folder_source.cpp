// Folders of numbered PNG/JPEG frames, decoded with libavcodec's image
// decoders so sizes, bit depths and colour handling match video files.
#include <algorithm>
#include <cctype>
#include <filesystem>
#include <map>

extern "C" {
#include <libavutil/pixdesc.h>
}

#include "analyzer/decode/frame_scaler.h"
#include "analyzer/decode/image_sources.h"
#include "analyzer/decode/libav_util.h"
#include "analyzer/decode/stream_timing.h"

namespace clipwarden::decode {
namespace {

std::string lower(std::string s) {
  for (char& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return s;
}

bool is_frame_file(const std::filesystem::path& p) {
  const std::string ext = lower(p.extension().string());
  return ext == ".png" || ext == ".jpg" || ext == ".jpeg";
}

// One picture file -> one AVFrame. Keeps a decoder per codec and the file
// buffer from picture to picture.
class ImageDecoder {
 public:
  Status decode(const std::string& path, AVFrame* frame);

 private:
  Expected<AVCodecContext*> decoder_for(AVCodecID id, const std::string& path);

  std::map<AVCodecID, CodecPtr> decoders_;
  std::vector<uint8_t> bytes_;
  PacketPtr packet_{av_packet_alloc()};
};

Expected<AVCodecContext*> ImageDecoder::decoder_for(AVCodecID id, const std::string& path) {
  auto& slot = decoders_[id];
  if (slot) return slot.get();
  const AVCodec* codec = avcodec_find_decoder(id);
  if (!codec) return input_error(path, std::string("no decoder for ") + avcodec_get_name(id));
  CodecPtr context(avcodec_alloc_context3(codec));
  if (!context) return Error{ErrorKind::internal, path, "out of memory"};
  context->thread_count = 1;  // one picture per packet: frame threading would only add delay
  context->max_pixels = kMaxPixels;
  if (avcodec_open2(context.get(), codec, nullptr) < 0)
    return input_error(path, std::string("cannot open the ") + codec->name + " decoder");
  slot = std::move(context);
  return slot.get();
}

Status ImageDecoder::decode(const std::string& path, AVFrame* frame) {
  auto size = read_file_bytes(path, bytes_, AV_INPUT_BUFFER_PADDING_SIZE);
  if (!size) return size.error();
  AVCodecID id = AV_CODEC_ID_NONE;
  static const uint8_t kPng[4] = {0x89, 'P', 'N', 'G'};
  if (*size >= 8 && std::equal(kPng, kPng + 4, bytes_.begin())) id = AV_CODEC_ID_PNG;
  if (*size >= 3 && bytes_[0] == 0xFF && bytes_[1] == 0xD8 && bytes_[2] == 0xFF)
    id = AV_CODEC_ID_MJPEG;
  if (id == AV_CODEC_ID_NONE) return input_error(path, "not a PNG or JPEG image");
  auto decoder = decoder_for(id, path);
  if (!decoder) return decoder.error();
  if (!packet_) return Error{ErrorKind::internal, path, "out of memory"};
  packet_->data = bytes_.data();
  packet_->size = static_cast<int>(*size);
  packet_->flags = AV_PKT_FLAG_KEY;  // every picture stands alone
  clear_av_log_message();
  int rc = avcodec_send_packet(*decoder, packet_.get());
  if (rc >= 0) rc = avcodec_receive_frame(*decoder, frame);
  if (rc < 0) {
    avcodec_flush_buffers(*decoder);
    std::string reason = last_av_log_message();
    return input_error(
        path, "cannot decode the image (" + (reason.empty() ? av_error_text(rc) : reason) + ")");
  }
  return Ok{};
}

class FolderSource final : public ClipSource {
 public:
  FolderSource(std::vector<std::string> files, double fps, FramePtr first, ClipInfo info,
               cv::Size output)
      : files_(std::move(files)),
        frame_(std::move(first)),
        scaler_(output, 0),
        timing_(1.0 / fps, 1.0 / fps),
        info_(std::move(info)) {}

  const ClipInfo& info() const override { return info_; }
  StreamFacts stream_facts() const override { return facts_; }

  Expected<FrameRead> read(DecodedFrame& out) override {
    if (next_ >= files_.size()) {
      facts_ = timing_.facts();
      return FrameRead::end_of_clip;
    }
    const std::string& file = files_[next_];
    if (next_ > 0) {  // the first picture was decoded at open
      av_frame_unref(frame_.get());
      if (auto decoded = decoder_.decode(file, frame_.get()); !decoded) return decoded.error();
      if (frame_->width != first_width() || frame_->height != first_height())
        return input_error(
            file, "frame size " + std::to_string(frame_->width) + "x" +
                      std::to_string(frame_->height) + " differs from the first frame's " +
                      std::to_string(first_width()) + "x" + std::to_string(first_height()));
    }
    out.index = static_cast<int64_t>(next_);
    out.t_s = timing_.add(static_cast<int64_t>(next_));
    ++next_;
    auto converted = scaler_.convert(*frame_, out.bgr, file);
    if (!converted) return converted.error();
    return FrameRead::frame;
  }

 private:
  int first_width() const { return info_.width; }
  int first_height() const { return info_.height; }

  std::vector<std::string> files_;
  size_t next_ = 0;
  ImageDecoder decoder_;
  FramePtr frame_;
  FrameScaler scaler_;
  StreamTiming timing_;
  ClipInfo info_;
  StreamFacts facts_;
};

// Lists the folder, decodes its first picture and describes the clip.
Expected<std::unique_ptr<FolderSource>> open_folder(const std::string& folder,
                                                    const SourceOptions& options) {
  install_quiet_av_log();
  std::vector<std::string> files = list_frame_files(folder);
  if (files.empty()) return input_error(folder, "folder holds no PNG or JPEG frames");
  const double fps = options.folder_fps.value_or(kDefaultFolderFps);
  if (!(fps > 0)) return usage_error(folder, "folder frame rate must be positive");
  FramePtr first(av_frame_alloc());
  if (!first) return Error{ErrorKind::internal, folder, "out of memory"};
  ImageDecoder probe;
  if (auto decoded = probe.decode(files.front(), first.get()); !decoded) return decoded.error();
  ClipInfo info;
  info.path = folder;
  info.container = "image_folder";
  info.codec =
      lower(std::filesystem::path(files.front()).extension().string()) == ".png" ? "png" : "mjpeg";
  const auto* pixel = av_pix_fmt_desc_get(static_cast<AVPixelFormat>(first->format));
  info.pix_fmt = pixel ? pixel->name : "";
  info.bit_depth = pixel ? pixel->comp[0].depth : 8;
  info.width = first->width;
  info.height = first->height;
  info.fps = fps;
  info.frame_count = static_cast<int64_t>(files.size());
  info.duration_s = static_cast<double>(files.size()) / fps;
  const cv::Size output = working_size(info.width, info.height, options.working_long_side);
  return std::make_unique<FolderSource>(std::move(files), fps, std::move(first), std::move(info),
                                        output);
}

}  // namespace

bool natural_less(const std::string& a, const std::string& b) {
  size_t i = 0, j = 0;
  while (i < a.size() && j < b.size()) {
    const bool da = std::isdigit(static_cast<unsigned char>(a[i]));
    const bool db = std::isdigit(static_cast<unsigned char>(b[j]));
    if (da && db) {
      size_t ei = i, ej = j;
      while (ei < a.size() && std::isdigit(static_cast<unsigned char>(a[ei]))) ++ei;
      while (ej < b.size() && std::isdigit(static_cast<unsigned char>(b[ej]))) ++ej;
      std::string na = a.substr(i, ei - i), nb = b.substr(j, ej - j);
      na.erase(0, std::min(na.find_first_not_of('0'), na.size()));
      nb.erase(0, std::min(nb.find_first_not_of('0'), nb.size()));
      if (na.size() != nb.size()) return na.size() < nb.size();
      if (na != nb) return na < nb;
      i = ei;
      j = ej;
    } else {
      if (a[i] != b[j]) return a[i] < b[j];
      ++i;
      ++j;
    }
  }
  if (a.size() - i != b.size() - j) return a.size() - i < b.size() - j;
  return a < b;  // equal by value ("f01" vs "f1"): any fixed order
}

std::vector<std::string> list_frame_files(const std::string& folder) {
  std::vector<std::string> names;
  std::error_code ec;
  for (const auto& entry : std::filesystem::directory_iterator(folder, ec))
    if (entry.is_regular_file(ec) && is_frame_file(entry.path()))
      names.push_back(entry.path().filename().string());
  std::sort(names.begin(), names.end(), natural_less);
  for (auto& name : names) name = (std::filesystem::path(folder) / name).string();
  return names;
}

Expected<std::unique_ptr<ClipSource>> open_folder_source(const std::string& folder,
                                                         const SourceOptions& options) {
  auto source = open_folder(folder, options);
  if (!source) return source.error();
  return std::unique_ptr<ClipSource>(std::move(*source));
}

Expected<std::pair<ClipInfo, StreamFacts>> probe_folder(const std::string& folder,
                                                        const SourceOptions& options) {
  auto source = open_folder(folder, options);
  if (!source) return source.error();
  // A folder's timing is its frame rate: every frame one interval apart.
  StreamTiming timing(1.0, 1.0);
  for (int64_t i = 0; i < (*source)->info().frame_count; ++i) timing.add(i);
  StreamFacts facts = timing.facts();
  facts.video_duration_s = (*source)->info().duration_s;
  return std::make_pair((*source)->info(), facts);
}

}  // namespace clipwarden::decode
