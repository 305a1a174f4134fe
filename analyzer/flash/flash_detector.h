// Photosensitive flash screening after WCAG 2.x, Success Criterion 2.3.1 and
// the definition "general flash and red flash thresholds" (W3C, WCAG 2.2,
// guidelines/terms/20/general-flash-and-red-flash-thresholds.html):
//
//  - general flash: "a pair of opposing changes in relative luminance of 10%
//    or more of the maximum relative luminance where the relative luminance
//    of the darker image is below 0.80";
//  - red flash: "any pair of opposing transitions involving a saturated red",
//    with the working definition of the same page (after Harding & Binnie):
//    "for either or both states involved in each transition, R/(R+G+B) >= 0.8,
//    and the change in the value of (R-G-B)x320 is > 20 (negative values of
//    (R-G-B)x320 are set to zero) for both transitions. R, G, B values range
//    from 0-1 as specified in 'relative luminance' definition" - we read the
//    latter as the linearised R, G, B of that definition. (WCAG 2.2 also
//    names a newer working definition on CIE 1976 u'v' chromaticity; not
//    implemented here.)
//  - content fails when there are more than three flashes "within any
//    one-second period" AND the flashing covers more than 25% of a
//    10-degree field (area_rule.h).
//
// How it is computed. Each frame is averaged onto a grid of cells of about
// 0.1 degree (300 cells across the reference screen's width; WCAG exempts
// balanced patterns finer than 0.1 degree, and asks for average colours of
// dithered areas). Every cell follows its relative luminance and its red
// quantity with a SwingTracker; a transition is stamped with the time of the
// frame that completes it. For a frame at time t, the one-second window is
// (t - 1 s, t] and a cell's flashes in it are floor(transitions / 2): a flash
// is two opposing transitions, so "N flashes per second" is a flash
// frequency of N Hz (one dark-light-dark cycle per flash). Flashes in
// different cells of the same window count as concurrent (conservative).
// The frame's value is the largest n for which cells with >= n flashes cover
// more than 25% of some 10-degree field; n > 3 is a hazard.
//
// This is a screening aid, not a certification.
#pragma once

#include <deque>
#include <vector>

#include <opencv2/core.hpp>

#include "analyzer/flash/swing_tracker.h"

namespace framelint::flash {

// WCAG 2.x thresholds (definition quoted above).
inline constexpr float kGeneralMinChange = 0.1f;     // "10% or more"
inline constexpr float kGeneralDarkerBelow = 0.8f;   // "darker image is below 0.80"
inline constexpr float kRedSaturatedRatio = 0.8f;    // "R/(R+G+B) >= 0.8"
inline constexpr float kRedScale = 320.0f;           // "(R-G-B)x320"
inline constexpr float kRedMinChange = 20.0f;        // "is > 20"
inline constexpr double kWindow_s = 1.0;             // "any one-second period"
inline constexpr int kMaxFlashesPerWindow = 3;       // "no more than three"

// Cells across each axis of the grid at most (about 0.1 degree each).
inline constexpr int kGridCellsPerAxis = 300;

// One frame's verdict. Counts are flashes in the one-second window ending at
// this frame, only where the area rule is met; 0 otherwise.
struct FlashFrame {
  double t_s = 0;
  int general_flashes = 0;
  int red_flashes = 0;
  // Where the rule was met, as fractions of the frame (x, y, w, h in [0,1]);
  // empty when the count is 0.
  cv::Rect2d general_field, red_field;

  int flashes() const { return general_flashes > red_flashes ? general_flashes : red_flashes; }
  bool hazard() const { return flashes() > kMaxFlashesPerWindow; }
};

// The red quantity of one linear-light colour: max(0, (R-G-B) x 320), and
// whether it is a saturated red, R/(R+G+B) >= 0.8.
SwingSample red_sample(float r, float g, float b);

class FlashDetector {
 public:
  // frame_size: size of the planes that will be fed.
  explicit FlashDetector(cv::Size frame_size, int cells_per_axis = kGridCellsPerAxis);

  // One frame, in time order. luminance: CV_32FC1 relative luminance in
  // [0,1]; linear_bgr: CV_32FC3 linear-light B, G, R in [0,1] (the
  // linearised sRGB values of the "relative luminance" definition).
  FlashFrame add_frame(double t_s, const cv::Mat& luminance, const cv::Mat& linear_bgr);

  cv::Size grid() const { return grid_; }
  cv::Size field() const { return field_; }

 private:
  struct Stamped {
    double t_s = 0;
    std::vector<int> general_cells, red_cells;  // cells with a transition at t_s
  };
  void expire(double t_s);

  cv::Size grid_, field_;
  std::vector<SwingTracker> general_, red_;
  std::deque<Stamped> window_;
  cv::Mat general_transitions_, red_transitions_;  // CV_32SC1, in the window
  long general_total_ = 0, red_total_ = 0;
  cv::Mat luminance_cells_, colour_cells_, flash_counts_;  // scratch
};

}  // namespace framelint::flash
