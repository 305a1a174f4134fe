#include "analyzer/review/clip_media.h"

#include <algorithm>
#include <vector>

#include <opencv2/imgproc.hpp>

#include "analyzer/encode/picture_encoding.h"
#include "clipwarden/analysis.h"
#include "clipwarden/clip_source.h"
#include "analyzer/encode/clip_writer.h"
#include "clipwarden/inspect.h"

namespace clipwarden::review {
namespace {

constexpr int kJpegQuality = 80;
constexpr int kPreviewLongSide = 1280;

cv::Mat scaled_to_height(const cv::Mat& bgr, int height) {
  if (bgr.empty()) return bgr;
  const int width = std::max(1, bgr.cols * height / std::max(1, bgr.rows));
  cv::Mat out;
  cv::resize(bgr, out, cv::Size(width, height), 0, 0, cv::INTER_AREA);
  return out;
}

std::string text_of(const nlohmann::json& j, const char* key) {
  auto it = j.find(key);
  return it != j.end() && it->is_string() ? it->get<std::string>() : "";
}

}  // namespace

Expected<std::string> frame_strip_jpeg(const std::string& clip_path, int count, int height) {
  SourceOptions options;
  options.working_long_side = std::max(64, height * 2);
  auto source = ClipSource::open(clip_path, options);
  if (!source) return source.error();
  // The container's frame count may be an estimate (or 0): keep every frame
  // small enough to hold, then pick evenly among those decoded.
  std::vector<cv::Mat> frames;
  DecodedFrame frame;
  for (;;) {
    auto more = (*source)->read(frame);
    if (!more) return more.error();
    if (*more == FrameRead::end_of_clip) break;
    frames.push_back(scaled_to_height(frame.bgr, height));
  }
  if (frames.empty()) return input_error(clip_path, "has no frames");
  std::vector<cv::Mat> picked;
  const int n = std::min<int>(count, static_cast<int>(frames.size()));
  for (int i = 0; i < n; ++i) {
    const size_t at = n == 1 ? 0 : i * (frames.size() - 1) / (n - 1);
    picked.push_back(frames[at]);
  }
  cv::Mat strip;
  cv::hconcat(picked, strip);
  auto jpeg = jpeg_file_bytes(strip, kJpegQuality);
  if (!jpeg) return output_error(clip_path, "the frame strip could not be encoded");
  return *jpeg;
}

bool browser_plays(const nlohmann::json& clip) {
  const std::string container = text_of(clip, "container");
  const std::string codec = text_of(clip, "codec");
  const std::string pix_fmt = text_of(clip, "pix_fmt");
  // libav names the MP4 family "mov,mp4,m4a,3gp,3g2,mj2" and WebM "matroska,webm".
  const bool mp4 = container.find("mp4") != std::string::npos;
  const bool webm = container.find("webm") != std::string::npos;
  const bool picture = pix_fmt == "yuv420p" || pix_fmt == "yuvj420p";
  if (!picture) return false;
  if (codec == "h264") return mp4;
  if (codec == "vp8" || codec == "vp9" || codec == "av1") return mp4 || webm;
  return false;
}

Status write_browser_preview(const std::string& clip_path, const std::string& out_path) {
  if (!h264_encoder_available())
    return output_error(clip_path, "no browser-playable preview: libav has no H.264 encoder");
  SourceOptions options;
  options.working_long_side = kPreviewLongSide;
  auto source = ClipSource::open(clip_path, options);
  if (!source) return source.error();
  DecodedFrame frame;
  std::unique_ptr<ClipWriter> writer;
  double last_t = -1;
  for (;;) {
    auto more = (*source)->read(frame);
    if (!more) return more.error();
    if (*more == FrameRead::end_of_clip) break;
    if (frame.t_s <= last_t) continue;  // repeated timestamps: keep the first
    last_t = frame.t_s;
    // 4:2:0 needs even sizes; a crop of one pixel is not visible.
    const cv::Mat even = frame.bgr(cv::Rect(0, 0, frame.bgr.cols & ~1, frame.bgr.rows & ~1));
    if (!writer) {
      ClipWriterOptions w;
      w.codec = VideoCodec::h264;
      w.crf = 23;
      const double fps = (*source)->info().fps;
      w.nominal_fps = fps > 0 ? fps : 25;
      auto created = ClipWriter::create(out_path, even.cols, even.rows, w);
      if (!created) return created.error();
      writer = std::move(*created);
    }
    if (auto st = writer->write(even.clone(), frame.t_s); !st) return st;
  }
  if (!writer) return input_error(clip_path, "has no frames");
  return writer->finish();
}

Expected<std::string> frame_panels_jpeg(const std::string& clip_path, int64_t frame,
                                        const nlohmann::json& settings) {
  auto panels = inspect_frame(clip_path, frame, settings_from_json(settings));
  if (!panels) return panels.error();
  const FramePanels& p = *panels;
  cv::Mat out;
  if (!p.has_previous) {
    out = p.current;
  } else {
    cv::Mat top, bottom;
    cv::hconcat(std::vector<cv::Mat>{p.current, p.warped_previous}, top);
    cv::hconcat(std::vector<cv::Mat>{p.warp_error_heat, p.flow_colour}, bottom);
    cv::vconcat(top, bottom, out);
  }
  auto jpeg = jpeg_file_bytes(out, kJpegQuality);
  if (!jpeg) return output_error(clip_path, "the panels could not be encoded");
  return *jpeg;
}

}  // namespace clipwarden::review
