// Pictures for the HTML page: thumbnails during analysis, then one targeted
// pass that builds frame pairs only at the frames the page shows. The page
// itself (report/html) only lays out what this pass made.
#include <algorithm>
#include <map>
#include <set>

#include <opencv2/imgproc.hpp>

#include "analyzer/encode/picture_encoding.h"
#include "analyzer/inspect/frame_walk.h"
#include "analyzer/inspect/panels.h"
#include "analyzer/inspect/page_pictures.h"
#include "clipwarden/report_io.h"
#include "analyzer/core/object_boxes.h"

namespace clipwarden {
namespace {

constexpr size_t kMaxObjectsPerPanel = 3;
constexpr int kLookLongSidePx = 112;  // object crops, upscaled or downscaled to this

cv::Mat resize_to_width(const cv::Mat& image, int width_px) {
  if (image.empty() || image.cols <= width_px) return image;
  const int height =
      std::max(1, static_cast<int>(std::lround(double(image.rows) * width_px / image.cols)));
  cv::Mat out;
  cv::resize(image, out, {width_px, height}, 0, 0, cv::INTER_AREA);
  return out;
}

cv::Mat crop_look(const cv::Mat& frame, cv::Rect box) {
  box &= cv::Rect(0, 0, frame.cols, frame.rows);
  if (box.area() <= 0) return {};
  const double scale = double(kLookLongSidePx) / std::max(box.width, box.height);
  cv::Mat out;
  cv::resize(frame(box), out,
             {std::max(1, int(std::lround(box.width * scale))),
              std::max(1, int(std::lround(box.height * scale)))},
             0, 0, scale > 1 ? cv::INTER_NEAREST : cv::INTER_AREA);
  return out;
}

// Occlusion shown over the frame: the current frame faded to grey, pixels
// that fail the forward-backward check painted red.
cv::Mat occlusion_overlay(const cv::Mat& current_bgr, const cv::Mat& occlusion_mask) {
  cv::Mat gray, out;
  cv::cvtColor(current_bgr, gray, cv::COLOR_BGR2GRAY);
  gray.convertTo(gray, CV_8U, 0.45, 140);  // light, low-contrast backdrop
  cv::cvtColor(gray, out, cv::COLOR_GRAY2BGR);
  out.setTo(cv::Scalar(60, 50, 200), occlusion_mask);
  return out;
}

bool is_drift_peak(const Report& report, int64_t frame) {
  return std::any_of(report.segments.begin(), report.segments.end(), [&](const Segment& s) {
    return s.metric == "drift" && s.peak_frame == frame;
  });
}

int severity_rank(Severity s) { return s == Severity::reject ? 2 : s == Severity::review ? 1 : 0; }

}  // namespace

EncodedImage encode_jpeg(const cv::Mat& bgr, int quality) {
  EncodedImage out;
  auto bytes = jpeg_file_bytes(bgr, quality);
  if (!bytes) return out;
  out.mime = "image/jpeg";
  out.bytes = std::move(*bytes);
  out.width_px = bgr.cols;
  out.height_px = bgr.rows;
  return out;
}

EncodedImage encode_png(const cv::Mat& image) {
  EncodedImage out;
  auto bytes = png_file_bytes(image);
  if (!bytes) return out;
  out.mime = "image/png";
  out.bytes = std::move(*bytes);
  out.width_px = image.cols;
  out.height_px = image.rows;
  return out;
}

ThumbnailCollector::ThumbnailCollector(int max_count, int width_px, int jpeg_quality)
    : max_count_(std::max(2, max_count)), width_px_(width_px), jpeg_quality_(jpeg_quality) {}

void ThumbnailCollector::add(const DecodedFrame& frame) {
  if (frame.index % interval_ != 0 || frame.bgr.empty()) return;
  thumbnails_.push_back(
      {frame.index, frame.t_s, encode_jpeg(resize_to_width(frame.bgr, width_px_), jpeg_quality_)});
  if (static_cast<int>(thumbnails_.size()) <= max_count_) return;
  interval_ *= 2;
  std::erase_if(thumbnails_, [&](const Thumbnail& t) { return t.frame_index % interval_ != 0; });
}

std::vector<int64_t> panel_frames(const Report& report, const HtmlOptions& options) {
  std::vector<const Segment*> order;
  for (const auto& s : report.segments) order.push_back(&s);
  std::stable_sort(order.begin(), order.end(), [](const Segment* a, const Segment* b) {
    if (severity_rank(a->severity) != severity_rank(b->severity))
      return severity_rank(a->severity) > severity_rank(b->severity);
    return (a->end_frame - a->start_frame) > (b->end_frame - b->start_frame);
  });
  std::vector<int64_t> frames;
  for (const Segment* s : order) {
    if (static_cast<int>(frames.size()) >= options.max_panel_sets) break;
    if (s->peak_frame < 0 || std::find(frames.begin(), frames.end(), s->peak_frame) != frames.end())
      continue;
    frames.push_back(s->peak_frame);
  }
  return frames;
}

PanelImages encode_panels(const FramePanels& panels, const Report& report,
                          const HtmlOptions& options) {
  PanelImages out;
  out.frame_index = panels.frame_index;
  out.t_s = panels.t_s;
  out.has_previous = panels.has_previous;
  out.max_flow_px = panels.max_flow_px;
  out.mean_warp_error = panels.mean_warp_error;
  out.occluded_pct = panels.occluded_pct;
  const int w = options.panel_width_px, q = options.jpeg_quality;
  out.current = encode_jpeg(resize_to_width(panels.current, w), q);
  if (panels.has_previous) {
    out.previous = encode_jpeg(resize_to_width(panels.previous, w), q);
    out.warped_previous = encode_jpeg(resize_to_width(panels.warped_previous, w), q);
    out.warp_error_heat = encode_jpeg(resize_to_width(panels.warp_error_heat, w), q);
    out.flow_colour = encode_jpeg(resize_to_width(panels.flow_colour, w), q);
    out.occlusion = encode_jpeg(
        resize_to_width(occlusion_overlay(panels.current, panels.occlusion_mask), w), q);
  }
  if (!is_drift_peak(report, panels.frame_index)) return out;
  cv::Mat boxed = panels.current.clone();
  const cv::Size size = panels.current.size();
  for (const TrackedObject* object :
       objects_at_frame(report, panels.frame_index, size, kMaxObjectsPerPanel)) {
    ObjectLook look;
    look.object_id = object->id;
    look.box_px = *object_box_at(*object, panels.frame_index, size);
    look.first_frame = object->first_frame;
    look.current_look = encode_jpeg(crop_look(panels.current, look.box_px), q);
    cv::rectangle(boxed, look.box_px, cv::Scalar(0, 215, 255), 2);
    cv::putText(boxed, "#" + std::to_string(object->id), look.box_px.tl() + cv::Point(3, 14),
                cv::FONT_HERSHEY_SIMPLEX, 0.45, cv::Scalar(0, 215, 255), 1, cv::LINE_AA);
    out.objects.push_back(std::move(look));
  }
  if (!out.objects.empty()) out.current_with_boxes = encode_jpeg(resize_to_width(boxed, w), q);
  return out;
}

PanelLegends make_panel_legends() {
  PanelLegends legends;
  legends.flow_wheel = encode_png(flow_colour_key(96));
  legends.warp_error_bar = encode_png(warp_error_colour_bar(256, 1, false));
  for (double position : warp_error_tick_positions())
    legends.warp_error_ticks.emplace_back(position, warp_error_at_position(position));
  return legends;
}

HtmlAssets collect_html_assets(const Report& report, const AnalysisSettings& settings,
                               const HtmlOptions& options, std::vector<Thumbnail> thumbnails) {
  HtmlAssets assets;
  assets.thumbnails = std::move(thumbnails);
  const bool need_thumbnails = assets.thumbnails.empty();
  const std::vector<int64_t> frames = panel_frames(report, options);
  if (frames.empty() && !need_thumbnails) return assets;

  // Objects whose first look the drift panels show, by the frame of that
  // look; boxes are placed once the working frame size is known.
  std::multimap<int64_t, std::pair<int, cv::Rect>> first_looks_wanted;
  auto want_first_looks = [&](cv::Size size) {
    for (int64_t f : frames) {
      if (!is_drift_peak(report, f)) continue;
      for (const TrackedObject* o : objects_at_frame(report, f, size, kMaxObjectsPerPanel))
        if (auto first = object_first_box(*o, size))
          first_looks_wanted.insert({first->frame, {o->id, first->box_px}});
    }
  };
  bool first_frame_seen = false;
  std::map<int, EncodedImage> first_looks;
  ThumbnailCollector collector;
  FrameWalk walk;
  walk.pair_frames = {frames.begin(), frames.end()};
  walk.decode_to_end = need_thumbnails;
  walk.on_frame = [&](const DecodedFrame& frame) {
    if (!first_frame_seen) want_first_looks(frame.bgr.size()), first_frame_seen = true;
    if (need_thumbnails) collector.add(frame);
    auto [lo, hi] = first_looks_wanted.equal_range(frame.index);
    for (auto it = lo; it != hi; ++it)
      first_looks[it->second.first] =
          encode_jpeg(crop_look(frame.bgr, it->second.second), options.jpeg_quality);
  };
  walk.on_pair = [&](const FramePair& pair) {
    assets.panels.push_back(encode_panels(make_pair_panels(pair), report, options));
  };
  walk.on_first_frame = [&](const FramePlanes& frame) {
    assets.panels.push_back(encode_panels(make_first_frame_panels(frame), report, options));
  };
  auto walked = walk_frames(report.clip.path, settings, walk);
  if (!walked) assets.notes.push_back("Pictures are missing: " + walked.error().message() + ".");
  if (need_thumbnails) assets.thumbnails = collector.thumbnails();
  if (!assets.panels.empty()) assets.legends = make_panel_legends();

  for (auto& panel : assets.panels)
    for (auto& look : panel.objects)
      if (auto it = first_looks.find(look.object_id); it != first_looks.end())
        look.first_look = it->second;
  // Worst first, as panel_frames ordered them.
  auto rank = [&](int64_t f) {
    return std::find(frames.begin(), frames.end(), f) - frames.begin();
  };
  std::sort(assets.panels.begin(), assets.panels.end(),
            [&](const PanelImages& a, const PanelImages& b) {
              return rank(a.frame_index) < rank(b.frame_index);
            });
  return assets;
}

Status write_html_report(const Report& report, const std::string& path,
                         const AnalysisSettings& settings, const HtmlOptions& options,
                         const std::vector<Thumbnail>* thumbnails) {
  HtmlAssets assets = collect_html_assets(report, settings, options,
                                          thumbnails ? *thumbnails : std::vector<Thumbnail>{});
  return write_file_atomic(path, render_clip_page(report, assets, options));
}

}  // namespace clipwarden
