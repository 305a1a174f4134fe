// The camera's path through a clip, from the per-pair camera homography
// (FramePair::camera_homography, prev -> cur), and its acceleration.
//
// Motion of a pair: the homography moves five reference points - the frame
// centre and the corners of the central 80% box - by d_i = H(p_i) - p_i
// pixels. Translation moves all five alike; rotation, zoom and perspective
// move the corners differently, so all of the camera's motion shows up as
// point displacement. (The corners of the 80% box rather than of the frame,
// because the fit is made on flow inside the frame and extrapolates worst at
// its edges.)
//
// Velocity of pair t (frames t-1 -> t): v_t,i = d_t,i / dt_t  [px/s].
// Acceleration at frame t, the centred second difference of the path:
//   a_t,i = (v_t+1,i - v_t,i) / ((dt_t + dt_t+1) / 2)          [px/s^2]
// jerk_t = sqrt(mean_i |a_t,i|^2) / diagonal                  [diagonals/s^2]
// Defined for frames 1..n-2 when both pairs have a camera fit.
//
// Frame-rate dependence: a smooth camera acceleration reads the same at any
// frame rate. A single frame displaced by a fraction delta of the diagonal
// gives velocity changes of delta*fps in and out, so its peak is
// 2 * delta * fps^2 diagonals/s^2 at the displaced frame (and half that at
// each neighbour): the same glitch reads 56x larger at 60 fps than at 8 fps,
// as the physical acceleration it implies does.
#pragma once

#include <array>
#include <vector>

#include <opencv2/core.hpp>

namespace clipwarden {

struct CameraStep {
  double dt_s = 0;
  bool valid = false;  // a trustworthy camera fit exists for this pair
  std::array<cv::Point2d, 5> displacement_px{};
};

// The five reference points of a frame of this size.
std::array<cv::Point2d, 5> camera_reference_points(cv::Size frame);

// d_i = H(p_i) - p_i for the reference points. Invalid when the homography
// sends a point to infinity or behind the camera.
CameraStep camera_step(const cv::Matx33d& prev_to_cur, cv::Size frame, double dt_s, bool valid);

// steps[t] describes pair (t-1, t); steps[0] is ignored. Returns one value
// per frame (steps.size()), NaN where undefined.
std::vector<double> camera_jerk(const std::vector<CameraStep>& steps, cv::Size frame);

}  // namespace clipwarden
