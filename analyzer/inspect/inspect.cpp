// clipwarden::inspect_frame and write_panel_pngs (include/clipwarden/inspect.h).
#include <cstdio>
#include <filesystem>

#include "analyzer/encode/picture_encoding.h"
#include "analyzer/inspect/frame_walk.h"
#include "analyzer/inspect/panels.h"
#include "clipwarden/inspect.h"
#include "clipwarden/report_io.h"

namespace clipwarden {

Expected<FramePanels> inspect_frame(const std::string& clip_path, int64_t frame_index,
                                    const AnalysisSettings& settings) {
  if (frame_index < 0)
    return usage_error("--frame",
                       "expects a frame index of 0 or more, got " + std::to_string(frame_index));
  std::optional<FramePanels> panels;
  FrameWalk walk;
  walk.pair_frames = {frame_index};
  walk.on_pair = [&](const FramePair& pair) { panels = make_pair_panels(pair); };
  walk.on_first_frame = [&](const FramePlanes& frame) { panels = make_first_frame_panels(frame); };
  auto walked = walk_frames(clip_path, settings, walk);
  if (!walked) return walked.error();
  if (!panels) {
    const int64_t n = walked->frames_decoded;
    return usage_error(clip_path, "frame " + std::to_string(frame_index) +
                                      " is out of range: the clip has " + std::to_string(n) +
                                      " frame" + (n == 1 ? "" : "s") +
                                      (n > 0 ? " (0 to " + std::to_string(n - 1) + ")" : ""));
  }
  return std::move(*panels);
}

Expected<std::vector<std::string>> write_panel_pngs(const FramePanels& panels,
                                                    const std::string& dir,
                                                    const std::string& stem) {
  std::error_code ec;
  std::filesystem::create_directories(dir, ec);
  if (ec) return output_error(dir, "cannot create output folder: " + ec.message());
  char index[32];
  std::snprintf(index, sizeof index, "-f%06lld-", static_cast<long long>(panels.frame_index));
  const std::string prefix = (std::filesystem::path(dir) / (stem + index)).string();

  std::vector<std::pair<std::string, cv::Mat>> images;
  if (panels.has_previous) images.emplace_back("previous", panels.previous);
  images.emplace_back("current", panels.current);
  if (panels.has_previous) {
    images.emplace_back("warped-prev", panels.warped_previous);
    images.emplace_back("warp-error-heat", panels.warp_error_heat);
    images.emplace_back("warp-error-colour-bar",
                        warp_error_colour_bar(std::max(panels.current.cols, 480), 56, true));
    images.emplace_back("flow-colour", panels.flow_colour);
    images.emplace_back("flow-colour-wheel", flow_colour_key(161));
    images.emplace_back("occlusion-mask", panels.occlusion_mask);
  }
  std::vector<std::string> paths;
  for (const auto& [what, image] : images) {
    const std::string path = prefix + what + ".png";
    auto png = png_file_bytes(image);
    if (!png) return output_error(path, "cannot encode the image as PNG");
    auto written = write_file_atomic(path, *png);
    if (!written) return written.error();
    paths.push_back(path);
  }
  return paths;
}

}  // namespace clipwarden
