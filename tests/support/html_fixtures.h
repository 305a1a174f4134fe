// An invented clip for tests of the HTML page and the panels: a slowly
// panning scene of coloured shapes with a ball crossing it, rendered
// synthetically with exactly known motion, and a report over it with every
// kind of segment, a tracked object, flashes, and hostile strings (a clip
// named like markup, a prompt with quotes and tags).
#pragma once

#include <string>

#include "analyzer/frame/frame_pair.h"
#include "clipwarden/html_report.h"
#include "clipwarden/report.h"

namespace clipwarden::fixtures {

inline constexpr const char* kHostileClipName = "<img src=x onerror=alert(1)>.mp4";
inline constexpr const char* kHostilePrompt =
    "A \"red\" ball & a <b>box</b>; it's <script>alert('x')</script> at dusk";

struct SyntheticScene {
  int width = 512;
  int height = 288;
  double fps = 30;
  int frame_count = 300;
  double pan_px_per_frame = 2.0;  // the camera pans right: the scene moves left
  cv::Point2d ball_start{60, 150};
  cv::Point2d ball_px_per_frame{1.2, -0.2};
  int ball_radius = 26;

  cv::Mat render(int64_t frame) const;  // CV_8UC3 BGR
  cv::Rect ball_box(int64_t frame) const;
  // The pair (frame-1, frame) with the true backward/forward flow, the
  // occlusion mask of the true motion and the warped previous frame.
  void make_pair(int64_t frame, FramePlanes& prev, FramePlanes& cur, FramePair& pair) const;

 private:
  mutable cv::Mat world_cache_;  // the static world, drawn on first use
};

// A 10 s, 30 fps report over the scene with hand-placed segments.
Report synthetic_report(const SyntheticScene& scene, const std::string& clip_path);

// The pictures for that report, built from the scene (no decoder needed).
HtmlAssets synthetic_assets(const Report& report, const SyntheticScene& scene,
                            const HtmlOptions& options);

}  // namespace clipwarden::fixtures
