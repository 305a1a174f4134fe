// The picture pass's parts (analyzer/inspect/page_pictures.cpp): how the
// page's images are encoded, which frames get panels, and the thumbnail strip
// kept during analysis. Internal: a library user calls collect_html_assets or
// write_html_report (clipwarden/html_report.h); the CLI, the gate and the
// Python module keep a ThumbnailCollector on AnalysisHooks::on_frame so the
// page need not decode the clip again for its strip.
#pragma once

#include <cstdint>
#include <vector>

#include <opencv2/core.hpp>

#include "clipwarden/clip_source.h"
#include "clipwarden/html_report.h"
#include "clipwarden/inspect.h"
#include "clipwarden/report.h"

namespace clipwarden {

EncodedImage encode_jpeg(const cv::Mat& bgr, int quality);
EncodedImage encode_png(const cv::Mat& image);

// Keeps one thumbnail every `interval` frames; when more than max_count
// would be kept, the interval doubles and every other thumbnail is dropped,
// so memory is bounded whatever the clip's length.
class ThumbnailCollector {
 public:
  explicit ThumbnailCollector(int max_count = 16, int width_px = 160, int jpeg_quality = 70);
  void add(const DecodedFrame& frame);  // usable as AnalysisHooks::on_frame
  const std::vector<Thumbnail>& thumbnails() const { return thumbnails_; }
  int64_t interval_frames() const { return interval_; }

 private:
  int max_count_;
  int width_px_;
  int jpeg_quality_;
  int64_t interval_ = 1;
  std::vector<Thumbnail> thumbnails_;
};

// The frames whose panels the page shows: the peak frames of the segments,
// worst first (reject, review, info; then longer first), without repeats,
// at most options.max_panel_sets.
std::vector<int64_t> panel_frames(const Report& report, const HtmlOptions& options);

// Encodes panels (downscaled to options.panel_width_px) for the page and adds
// the drift looks of objects present at that frame.
PanelImages encode_panels(const FramePanels& panels, const Report& report,
                          const HtmlOptions& options);

// The legends of the panel sets (the same for every clip).
PanelLegends make_panel_legends();

}  // namespace clipwarden
