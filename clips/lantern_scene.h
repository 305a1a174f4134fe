// The demo scene of clips/: "Lanternfish Studio", an invented animation
// studio, reviews generated shots of a paper lantern drifting across a
// harbour at dusk. The scene is drawn with OpenCV from a fixed seed, so
// every run renders the same pixels.
#pragma once

#include <opencv2/core.hpp>

namespace lanternfish {

struct ShotParams {
  cv::Size size{480, 270};
  double fps = 24;
  double pan_px_per_s = 24;      // the camera pans right over the harbour
  double camera_start_px = 0;    // world x of the view's left edge at t = 0
  double lantern_start_x = 150;  // world x of the lantern at t = 0
  double lantern_speed_px_per_s = 54;
  double time_offset_s = 0;  // renders the shot as if started this much later
  // Colour drift of the lantern (for the drift demo): hue rotation in
  // degrees, growing linearly from 0 at drift_start_s to drift_end_deg at
  // the end of the shot (0 = no drift).
  double drift_start_s = 0;
  double drift_end_deg = 0;
  double duration_s = 5;
  // > 1 frames a close-up: the view is cropped around the lantern by this
  // factor and scaled back up (for the "jump" to another framing).
  double close_up = 1;
};

class HarbourScene {
 public:
  explicit HarbourScene(const ShotParams& params);
  // The frame shown at time t_s (seconds from the shot's start).
  cv::Mat render(double t_s) const;
  // The lantern's body box in view pixels at t_s (for the truth file).
  cv::Rect2d lantern_box(double t_s) const;

 private:
  void draw_sky(cv::Mat& frame, double t, double camera_x) const;
  void draw_water(cv::Mat& frame, double t, double camera_x) const;
  void draw_lantern(cv::Mat& frame, double t, double camera_x) const;
  cv::Point2d lantern_world(double t) const;

  ShotParams p_;
  int horizon_y_ = 0;
  cv::Mat sky_texture_;    // CV_32FC1, world width, cloud density
  cv::Mat water_texture_;  // CV_32FC1, world width, ripple streaks
  cv::Mat skyline_;        // CV_8UC1 mask of the town's silhouette (world)
  cv::Mat windows_;        // CV_8UC1 mask of lit windows (world)
  int world_width_ = 0;
};

}  // namespace lanternfish
