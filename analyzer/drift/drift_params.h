// Constants of the drift tracker, in units that stay comparable across
// working sizes and frame rates: lengths are given at a 512 px long side and
// scaled with the working size; times are in seconds. The values are our own
// choices, calibrated on clean opencv-doc footage (docs/drift.md).
#pragma once

#include <algorithm>
#include <cmath>

namespace clipwarden::drift {

struct DriftParams {
  // Geometry (working pixels, already scaled to the frame).
  float px_scale = 1;            // long side / 512
  int object_step_px = 5;        // grid spacing of points on objects (scene cells: twice)
  int anchor_step_px = 16;       // grid spacing of illumination anchors
  int window_radius_px = 2;      // window-mean colour and gray: (2r+1)^2 window
  // Local gradient-orientation histograms: a wider window, read every
  // `histogram_stride_px`, so that a point a pixel or two off its material
  // position still reads the same local structure.
  int histogram_radius_px = 5;
  int histogram_stride_px = 2;
  float min_mover_speed_px_s = 8;   // residual speed that marks a moving region
  float min_mover_step_px = 0.35f;  // ... and never below flow noise per frame
  float ransac_inlier_px = 2;       // similarity fit inlier distance
  float slide_outlier_px = 6;       // a point this far off its object's motion has slid
  float scene_slide_px = 3;         // ... for the static scene, which moves rigidly

  // Counts.
  int max_objects = 8;
  int min_mover_points = 25;  // smaller moving components are fragments (~0.4% of the frame)
  int min_points_for_scale_alignment = 60;

  // Times (seconds).
  double proposal_interval_s = 0.5;  // how often new objects are looked for
  double point_pull_time_s = 0.3;    // points relax toward their object's motion
  double probation_s = 0.4;          // a new moving object's support is checked once then
  double unreliable_end_s = 1.0;     // an object no longer measurable ends (lost) after this
  // Continuity: larger changes within this window are tracking breaks.
  double continuity_window_s = 0.5;
  double max_colour_jump_de00 = 8;
  double max_size_jump_log = std::log(1.2);
  double max_structure_jump = 0.25;
  double vanish_after_s = 0.3;       // missing without occlusion this long -> vanished
  double lost_after_s = 2.0;         // occluded this long -> lost

  // Appearance thresholds.
  float point_gray_tolerance = 0.05f;  // a point matches its reference gray this well
  float reacquire_colour_de00 = 12;    // a hidden point comes back only this close
  float cut_valid_fraction = 0.3f;
  float cut_histogram_distance = 0.35f;

  // The combined drift scale: each aspect divided by the level at which a
  // reviewer sees a clear departure, so drift 1.0 = "clearly visible".
  double colour_unit_de00 = 20;    // CIEDE2000 of mean colour
  // CIEDE2000 of mean colour with the object's own brightness change taken
  // out: light and shade on a moving object (walking through shadow,
  // turning toward a window, exposure) scale its linear-light colour and
  // leave this near 0, so its level can sit closer to what a viewer sees.
  double own_colour_unit_de00 = 10;
  // On a moving object the full colour change counts at most this much: a
  // change of brightness alone (what is left when the own reading above is
  // small) opens a drift segment and is reported, but never reaches the
  // review level on its own. On the corpus's camera clips moving objects
  // reach a full ΔE00 of 16-23 with an own change of 1-4 (a dim guitar
  // close-up 23.1 / 2.1, a hand-held pool walker 21.1 / 3.6, vtest's walkers
  // 17.5 / 2.5, Chaplin's figures 16.3 / under 1): light and shade. Scene
  // cells keep it uncapped: they have no own reading (docs/drift.md).
  double moving_colour_cap = 0.9;
  double structure_unit = 0.6;     // gradient-orientation measure distance
  double size_unit_log = std::log(1.3);  // 30% larger or 23% smaller within the size window
  double size_window_s = 2.0;
  // Scene cells read in quarters: a quarter's own colour counts beyond its
  // clean level, the largest reading over the cell's first `quarter_clean_s`;
  // a quarter needs `min_quarter_points` followed points, and is read only
  // while every channel gain of the frame's illumination fit lies within
  // [1 / max_quarter_gain, max_quarter_gain].
  double quarter_clean_s = 0.5;
  int min_quarter_points = 8;
  float max_quarter_gain = 1.25f;
  // The size aspect counts at most this much: a size change is reported
  // (a drift segment opens from 0.35) but never reaches the review level
  // (1.0) on its own. The object's points spreading apart or closing in is
  // its own tracked motion: an approach, a recession, a turn; on real
  // footage nothing else read that way (docs/drift.md, "Size").
  double size_cap = 0.9;

  static DriftParams for_frame(int width, int height, int max_objects) {
    DriftParams p;
    p.px_scale = static_cast<float>(std::max(width, height)) / 512.0f;
    auto scaled = [&](int v) { return std::max(2, static_cast<int>(std::lround(v * p.px_scale))); };
    p.object_step_px = scaled(5);
    p.anchor_step_px = scaled(16);
    p.window_radius_px = std::max(1, p.object_step_px / 2);
    p.histogram_radius_px = 2 * p.window_radius_px + 1;
    p.histogram_stride_px = std::max(1, static_cast<int>(std::lround(2 * p.px_scale)));
    p.min_mover_speed_px_s *= p.px_scale;
    p.ransac_inlier_px *= p.px_scale;
    p.slide_outlier_px *= p.px_scale;
    p.scene_slide_px *= p.px_scale;
    p.max_objects = std::max(1, max_objects);
    return p;
  }
};

}  // namespace clipwarden::drift
