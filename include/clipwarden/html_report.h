// The per-clip HTML page: one self-contained file (inline CSS and SVG,
// images as data: URIs, a little inline script, a Content-Security-Policy
// that forbids everything else) that shows a reviewer where a clip goes
// wrong and why.
//
// The report holds numbers only; the page also needs pixels. They are
// gathered in two cheap steps, so analysis memory stays bounded:
//   1. during analysis, a hook on AnalysisHooks::on_frame may keep a few
//      small JPEG thumbnails (a bounded strip, thinned as the clip grows;
//      the CLI and the gate do);
//   2. after analysis, collect_html_assets() decodes the clip once more and
//      builds frame pairs only at the worst frames of the flagged segments
//      (and crops objects' first looks), as `clipwarden inspect` does.
// render_clip_page() then writes the page from the report and the assets.
#pragma once

#include <cstdint>
#include <string>
#include <utility>
#include <vector>

#include <opencv2/core.hpp>

#include "clipwarden/analysis.h"
#include "clipwarden/error.h"
#include "clipwarden/report.h"

namespace clipwarden {

// A compressed image ready for a data: URI.
struct EncodedImage {
  std::string mime;   // "image/jpeg" or "image/png"
  std::string bytes;  // the file's bytes
  int width_px = 0;
  int height_px = 0;
  bool empty() const { return bytes.empty(); }
};

// One picture of the page's strip of thumbnails.
struct Thumbnail {
  int64_t frame_index = 0;
  double t_s = 0;
  EncodedImage image;
};

// A tracked object seen at a panel's frame (drift).
struct ObjectLook {
  int object_id = 0;
  cv::Rect box_px;  // at the panel's frame, working-frame pixels
  int64_t first_frame = 0;
  EncodedImage first_look;    // the object's box at its first frame
  EncodedImage current_look;  // the object's box at the panel's frame
};

// The panels of one frame, encoded for the page (see FramePanels).
struct PanelImages {
  int64_t frame_index = 0;
  double t_s = 0;
  bool has_previous = false;
  EncodedImage previous, current, warped_previous, warp_error_heat, flow_colour, occlusion;
  EncodedImage current_with_boxes;  // drift: the current frame with object boxes
  std::vector<ObjectLook> objects;
  double max_flow_px = 0;
  double mean_warp_error = 0;
  double occluded_pct = 0;
};

// The keys every panel set shares: the flow colour wheel, the warp-error
// colour bar and its ticks (position along the bar 0..1, squared error).
struct PanelLegends {
  EncodedImage flow_wheel;
  EncodedImage warp_error_bar;
  std::vector<std::pair<double, double>> warp_error_ticks;
};

// Everything pictorial the page shows; made by the picture pass
// (collect_html_assets), only laid out by render_clip_page.
struct HtmlAssets {
  std::vector<Thumbnail> thumbnails;
  std::vector<PanelImages> panels;  // one per shown frame
  PanelLegends legends;             // set whenever panels are
  std::vector<std::string> notes;   // e.g. why pictures are missing
};

struct HtmlOptions {
  // Extra facts shown with the clip's own, e.g. {"prompt", "..."} from a
  // gate manifest. Shown as text, always escaped.
  std::vector<std::pair<std::string, std::string>> facts;
  int max_panel_sets = 8;  // flagged segments shown with pictures, worst first
  int panel_width_px = 320;
  int jpeg_quality = 80;
};

// Step 2 above. `thumbnails` are those collected during analysis; when empty
// they are collected in this pass. Never fails: if the clip cannot be read
// again, the assets carry a note saying so and the page is written without
// pictures.
HtmlAssets collect_html_assets(const Report& report, const AnalysisSettings& settings,
                               const HtmlOptions& options, std::vector<Thumbnail> thumbnails);

// The page's text.
std::string render_clip_page(const Report& report, const HtmlAssets& assets,
                             const HtmlOptions& options);

// collect_html_assets + render_clip_page, written atomically to `path`.
// `thumbnails`: a strip already at hand (the CLI and the gate keep one from
// the analysis' own frames); null to take it in the picture pass.
Status write_html_report(const Report& report, const std::string& path,
                         const AnalysisSettings& settings, const HtmlOptions& options,
                         const std::vector<Thumbnail>* thumbnails);

}  // namespace clipwarden
