// Test scenes for drift made from real images (opencv-doc): a background
// photograph moved by a known camera motion, and a textured patch cut from
// another photograph moving across it, with known changes injected into the
// patch (hue rotation, scale, fade) or into the whole frame (brightness).
#pragma once

#include <functional>
#include <vector>

#include <opencv2/core.hpp>

namespace clipwarden::test {

struct PatchState {
  double hue_deg = 0;  // rotation of CIELAB hue of the patch's pixels
  double scale = 1;    // size of the patch relative to its first look
  double alpha = 1;    // opacity
  double gain = 1;     // linear-light gain on the patch (light and shade)
};

struct DriftScene {
  cv::Mat background;  // larger than `size`; moved by the camera
  cv::Mat patch;       // BGR texture
  cv::Size size{480, 320};
  int frames = 48;
  cv::Point2f camera_px_per_frame{0.8f, 0.3f};
  cv::Point2f patch_start{120, 120};  // top-left corner in the frame
  cv::Point2f patch_px_per_frame{2.5f, 0.6f};
  std::function<PatchState(int frame)> patch_state = [](int) { return PatchState{}; };
  // Whole-frame change applied last (e.g. a brightness ramp).
  std::function<void(int frame, cv::Mat& bgr)> frame_filter;
};

std::vector<cv::Mat> render_scene(const DriftScene& scene);

// frame = alpha * over + (1 - alpha) * frame, per pixel (alpha: CV_32F in
// [0,1], the frame's size).
void blend(cv::Mat& frame, const cv::Mat& over, const cv::Mat& alpha);

// Rotates the CIELAB hue of every pixel by `degrees` (L* and chroma kept),
// back to 8-bit sRGB with clamping.
cv::Mat rotate_hue(const cv::Mat& bgr, double degrees);

// Multiplies each channel's linear-light value by `gain[c]` (B, G, R), as
// more or less light on the surface (IEC 61966-2-1 sRGB transfer), in place.
void scale_linear_light(cv::Mat& bgr, const double gain[3]);

// CIEDE2000 between the mean CIELAB colours of two images of the same size.
double mean_colour_de00(const cv::Mat& a, const cv::Mat& b);

// Loads an opencv-doc image, or an empty Mat.
cv::Mat load_sample_image(const std::string& name);

// A ramp from 0 (before `start`) to 1 (at and after `end`).
double ramp(int frame, int start, int end);

}  // namespace clipwarden::test
