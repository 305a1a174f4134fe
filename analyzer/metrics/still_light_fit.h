// Whether a block holds still while its light changes, judged without the
// optical flow. A pulse of light moves DIS flow: on an injected pulse's
// steepest frames the region's own motion rose from 0.25-0.45 to 0.7-0.87 px
// (docs/accuracy.md, "Local flicker judged on a flow the pulse does not
// move"), so a gate on the flow called the pulsing region a mover and its
// warp left a pattern behind. Here the previous frame is warped by the camera
// motion alone and each block's change is fitted by the brightness-change
// constraint with a gain and an offset beside the motion (Negahdaripour,
// "Revised definition of optical flow", IEEE PAMI 20(9), 1998):
//
//   cur - w  ~  a_q + g_q * w + u * dw/dx + v * dw/dy
//
// w the camera-warped previous luminance, (a_q, g_q) per quarter of the
// block (the edge of a lit region crossing a block is fitted on either
// side), (u, v) the block's own motion beyond the camera in px per frame,
// shared by its quarters. The light terms are partialled out of the motion
// terms quarter by quarter (Frisch-Waugh-Lovell), so an offset changes the
// motion estimate not at all; a gain g scales the motion term by (1 + g)
// (first order: cur = (1 + g) w(x + shift) + a), so a block that brightens
// by 30% reads 30% more motion (the safe side: it is less often called
// still) and one that darkens by 25% reads 25% less.
#pragma once

#include <vector>

#include <opencv2/core.hpp>

namespace clipwarden {

// The previous luminance warped onto the current frame by the camera
// homography alone (prev -> cur, as FramePair::camera_homography), bilinear;
// `valid` is 255 where the source point and its neighbours lie inside the
// previous frame (gradients need them).
void camera_warp(const cv::Mat& prev_luminance, const cv::Matx33d& camera_homography,
                 cv::Mat& warped, cv::Mat& valid);

struct StillLightFit {
  // Own motion beyond the camera (px per frame) and what the fit leaves
  // (standard deviation) and the block's mean change, both relative to the
  // block's mean warped luminance (at least level_floor). NaN where fewer
  // than half the pixels are valid.
  float motion_px = 0;
  float residual_spread = 0;
  float mean_change = 0;
  // The block's texture shows a motion of `probe_px` in any direction as a
  // misfit of at least `probe_spread` (relative) once light is fitted: only
  // then can the block vouch for its own stillness. Flat blocks and blocks of
  // one straight edge or a uniform ramp cannot (a ramp that slides along
  // itself reads as an offset).
  bool motion_observable = false;
};

std::vector<StillLightFit> block_still_light_fit(const cv::Mat& cur_luminance,
                                                 const cv::Mat& camera_warped_prev,
                                                 const cv::Mat& valid, int cols, int rows,
                                                 float level_floor, float probe_px,
                                                 float probe_spread);

}  // namespace clipwarden
