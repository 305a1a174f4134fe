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
// frequency of N Hz (one dark-light-dark cycle per flash). "Occurring
// concurrently": a cell's transition is only counted when, in some
// 10-degree field that contains it, cells changing the same way in the same
// frame (or the one before) outnumber those changing the other way by more
// than 25% of the field - a light flashing over an area changes it all one
// way at once, while a camera panning over texture moves every cell but as
// many up as down. The frame's value is the
// largest n for which cells with >= n counted flashes cover more than 25%
// of some 10-degree field; n > 3 is a hazard.
//
// This is a screening aid, not a certification.
#pragma once

#include <deque>
#include <vector>

#include <opencv2/core.hpp>

#include "analyzer/flash/cell_means.h"
#include "analyzer/flash/swing_tracker.h"

namespace clipwarden::flash {

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

  // The same from the frame's cell means on grid() (cell_means.h), which a
  // caller can compute elsewhere (the flash metric does so concurrently).
  FlashFrame add_cells(double t_s, const CellMeans& cells);

  cv::Size grid() const { return grid_; }
  cv::Size field() const { return field_; }

 private:
  struct Stamped {
    double t_s = 0;
    std::vector<int> cells;  // cells with a transition credited at t_s
  };
  // One rule's state: the per-cell trackers, the last two frames'
  // transition directions, and the transitions in the one-second window.
  struct Kind {
    SwingRule rule;
    std::vector<SwingTracker> trackers;
    // Per cell, the samples its tracker certainly ignores (quiet_range):
    // most cells skip update() on most frames.
    std::vector<float> quiet_lo, quiet_hi;
    // Cells that went up / down in this frame and the one before.
    int ups = 0, downs = 0, previous_ups = 0, previous_downs = 0;
    cv::Mat direction, previous_direction;  // CV_8SC1: +1 up, -1 down, 0
    cv::Mat previous_credited;              // CV_8UC1
    cv::Mat transitions;                    // CV_32SC1
    long total = 0;
    std::deque<Stamped> window;
  };
  void init(Kind& k, const SwingRule& rule);
  void follow_cells(const CellMeans& cells);
  void credit_concurrent(Kind& k, double t_s);
  void push(Kind& k, Stamped&& s);
  void expire(Kind& k, double t_s);
  void measure(const Kind& k, int& flashes, cv::Rect2d& where);

  cv::Size grid_, field_;
  Kind general_, red_;
  double previous_t_s_ = 0;
  bool has_previous_ = false;
  CellMeans cells_;       // scratch of add_frame
  cv::Mat flash_counts_;  // scratch
  std::vector<int32_t> flags_;  // scratch: a row's cells to update
};

}  // namespace clipwarden::flash
