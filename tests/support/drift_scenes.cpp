#include "support/drift_scenes.h"

#include <cmath>

#include <opencv2/imgcodecs.hpp>
#include <opencv2/imgproc.hpp>

#include "analyzer/color/ciede2000.h"
#include "analyzer/color/color_space.h"
#include "support/drift_pairs.h"

namespace clipwarden::test {

double ramp(int frame, int start, int end) {
  if (frame <= start) return 0;
  if (frame >= end) return 1;
  return static_cast<double>(frame - start) / (end - start);
}

cv::Mat load_sample_image(const std::string& name) {
  const std::string path = opencv_sample(name);
  return path.empty() ? cv::Mat() : cv::imread(path, cv::IMREAD_COLOR);
}

cv::Mat rotate_hue(const cv::Mat& bgr, double degrees) {
  cv::Mat out(bgr.size(), CV_8UC3);
  const double c = std::cos(degrees * M_PI / 180.0), s = std::sin(degrees * M_PI / 180.0);
  for (int y = 0; y < bgr.rows; ++y) {
    for (int x = 0; x < bgr.cols; ++x) {
      const cv::Vec3b p = bgr.at<cv::Vec3b>(y, x);
      color::Lab lab = color::srgb_to_lab({p[2] / 255.0, p[1] / 255.0, p[0] / 255.0});
      const double a = lab.a * c - lab.b * s, b = lab.a * s + lab.b * c;
      lab.a = a, lab.b = b;
      const color::Rgb rgb = color::lab_to_srgb(lab);
      out.at<cv::Vec3b>(y, x) = cv::Vec3b(cv::saturate_cast<uint8_t>(rgb.b * 255.0 + 0.5),
                                          cv::saturate_cast<uint8_t>(rgb.g * 255.0 + 0.5),
                                          cv::saturate_cast<uint8_t>(rgb.r * 255.0 + 0.5));
    }
  }
  return out;
}

void scale_linear_light(cv::Mat& bgr, const double gain[3]) {
  uchar lut[3][256];
  for (int c = 0; c < 3; ++c) {
    for (int v = 0; v < 256; ++v) {
      const double lin = color::srgb_to_linear(v / 255.0) * gain[c];
      lut[c][v] = cv::saturate_cast<uchar>(color::linear_to_srgb(lin) * 255.0 + 0.5);
    }
  }
  for (int y = 0; y < bgr.rows; ++y) {
    for (auto *p = bgr.ptr<cv::Vec3b>(y), *end = p + bgr.cols; p != end; ++p) {
      for (int c = 0; c < 3; ++c) (*p)[c] = lut[c][(*p)[c]];
    }
  }
}

double mean_colour_de00(const cv::Mat& a, const cv::Mat& b) {
  auto mean_lab = [](const cv::Mat& m) {
    color::Lab sum{};
    for (int y = 0; y < m.rows; ++y) {
      for (int x = 0; x < m.cols; ++x) {
        const cv::Vec3b p = m.at<cv::Vec3b>(y, x);
        const color::Lab lab = color::srgb_to_lab({p[2] / 255.0, p[1] / 255.0, p[0] / 255.0});
        sum.l += lab.l, sum.a += lab.a, sum.b += lab.b;
      }
    }
    const double n = static_cast<double>(m.total());
    return color::Lab{sum.l / n, sum.a / n, sum.b / n};
  };
  return color::ciede2000(mean_lab(a), mean_lab(b));
}

void blend(cv::Mat& frame, const cv::Mat& over, const cv::Mat& alpha) {
  for (int y = 0; y < frame.rows; ++y) {
    for (int x = 0; x < frame.cols; ++x) {
      const float a = alpha.at<float>(y, x);
      if (a <= 0) continue;
      cv::Vec3b& dst = frame.at<cv::Vec3b>(y, x);
      const cv::Vec3b src = over.at<cv::Vec3b>(y, x);
      for (int k = 0; k < 3; ++k) dst[k] = cv::saturate_cast<uint8_t>(a * src[k] + (1 - a) * dst[k]);
    }
  }
}

std::vector<cv::Mat> render_scene(const DriftScene& scene) {
  std::vector<cv::Mat> frames;
  for (int f = 0; f < scene.frames; ++f) {
    // Camera: the view slides over the background by a sub-pixel translation.
    const cv::Point2f cam = scene.camera_px_per_frame * static_cast<float>(f);
    cv::Matx23d shift(1, 0, -(20 + cam.x), 0, 1, -(20 + cam.y));
    cv::Mat frame;
    cv::warpAffine(scene.background, frame, shift, scene.size, cv::INTER_LINEAR,
                   cv::BORDER_REFLECT);
    const PatchState state = scene.patch_state(f);
    cv::Mat patch = state.hue_deg != 0 ? rotate_hue(scene.patch, state.hue_deg) : scene.patch.clone();
    if (state.gain != 1) {
      const double gain[3] = {state.gain, state.gain, state.gain};
      scale_linear_light(patch, gain);
    }
    // The patch is drawn scaled about its centre, at a sub-pixel position.
    const cv::Point2f corner = scene.patch_start + scene.patch_px_per_frame * static_cast<float>(f);
    const cv::Point2f centre = corner + cv::Point2f(patch.cols / 2.0f, patch.rows / 2.0f);
    const double s = state.scale;
    cv::Matx23d place(s, 0, centre.x - s * patch.cols / 2.0, 0, s, centre.y - s * patch.rows / 2.0);
    cv::Mat warped, mask;
    cv::warpAffine(patch, warped, place, scene.size, cv::INTER_LINEAR, cv::BORDER_CONSTANT);
    cv::Mat ones(patch.size(), CV_32F, cv::Scalar(static_cast<float>(state.alpha)));
    cv::warpAffine(ones, mask, place, scene.size, cv::INTER_LINEAR, cv::BORDER_CONSTANT);
    blend(frame, warped, mask);
    if (scene.frame_filter) scene.frame_filter(f, frame);
    frames.push_back(frame);
  }
  return frames;
}

}  // namespace clipwarden::test
