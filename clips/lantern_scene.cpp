#include "lantern_scene.h"

#include <algorithm>
#include <cmath>

#include <opencv2/imgproc.hpp>

namespace lanternfish {
namespace {

constexpr uint64_t kSeed = 20261201;

cv::Vec3f rgb(double r, double g, double b) {  // stored as BGR floats in [0, 1]
  return {static_cast<float>(b / 255), static_cast<float>(g / 255), static_cast<float>(r / 255)};
}

cv::Vec3f mix(const cv::Vec3f& a, const cv::Vec3f& b, double t) {
  const float u = static_cast<float>(std::clamp(t, 0.0, 1.0));
  return a * (1 - u) + b * u;
}

// Smooth noise stretched along x: coarse Gaussian noise upsampled
// bicubically, unit spread.
cv::Mat streak_noise(cv::Size size, int cell_x, int cell_y, cv::RNG& rng) {
  cv::Mat coarse(size.height / cell_y + 3, size.width / cell_x + 3, CV_32FC1);
  rng.fill(coarse, cv::RNG::NORMAL, 0, 1);
  cv::Mat fine;
  cv::resize(coarse, fine, cv::Size(coarse.cols * cell_x, coarse.rows * cell_y), 0, 0, cv::INTER_CUBIC);
  fine = fine(cv::Rect(0, 0, size.width, size.height)).clone();
  cv::Scalar mean, sd;
  cv::meanStdDev(fine, mean, sd);
  return (fine - mean[0]) / sd[0];
}

// The view's part of a world-sized layer, shifted by a fractional x.
cv::Mat view_of(const cv::Mat& world, double x, cv::Size view) {
  cv::Mat out;
  cv::warpAffine(world, out, cv::Matx23d(1, 0, -x, 0, 1, 0), view, cv::INTER_LINEAR, cv::BORDER_REFLECT);
  return out;
}

// Rotates the hue of an RGB colour (BGR floats) by `degrees`.
cv::Vec3f rotate_hue(const cv::Vec3f& bgr, double degrees) {
  cv::Mat px(1, 1, CV_32FC3, cv::Scalar(bgr[0], bgr[1], bgr[2])), hsv;
  cv::cvtColor(px, hsv, cv::COLOR_BGR2HSV);
  float& h = hsv.at<cv::Vec3f>(0, 0)[0];
  h = static_cast<float>(std::fmod(h + degrees + 360.0, 360.0));
  cv::cvtColor(hsv, px, cv::COLOR_HSV2BGR);
  return px.at<cv::Vec3f>(0, 0);
}

}  // namespace

HarbourScene::HarbourScene(const ShotParams& params) : p_(params) {
  horizon_y_ = p_.size.height * 56 / 100;
  const double max_t = p_.duration_s + p_.time_offset_s + 1;
  world_width_ = p_.size.width + static_cast<int>(p_.camera_start_px + p_.pan_px_per_s * max_t) + 64;
  cv::RNG rng(kSeed);
  sky_texture_ = streak_noise({world_width_, horizon_y_}, 48, 10, rng);
  water_texture_ = streak_noise({world_width_ + 256, p_.size.height - horizon_y_}, 14, 2, rng);

  // The town on the far shore: houses of seeded heights, a few lit windows,
  // a lighthouse.
  skyline_ = cv::Mat::zeros(horizon_y_ + 1, world_width_, CV_8UC1);
  windows_ = cv::Mat::zeros(horizon_y_ + 1, world_width_, CV_8UC1);
  for (int x = 0; x < world_width_;) {
    const int w = rng.uniform(14, 34), h = rng.uniform(8, 26);
    cv::rectangle(skyline_, cv::Rect(x, horizon_y_ - h, w, h + 1), 255, cv::FILLED);
    cv::fillConvexPoly(skyline_,
                       std::vector<cv::Point>{{x - 1, horizon_y_ - h}, {x + w / 2, horizon_y_ - h - w / 3},
                                              {x + w, horizon_y_ - h}},
                       255);
    for (int k = 0; k < 3; ++k)
      if (rng.uniform(0, 3) == 0)
        cv::rectangle(windows_, cv::Rect(x + 3 + k * (w / 3), horizon_y_ - h + 4, 2, 3), 255, cv::FILLED);
    x += w + rng.uniform(0, 10);
  }
  const int light_x = world_width_ * 2 / 3;
  cv::rectangle(skyline_, cv::Rect(light_x, horizon_y_ - 52, 7, 52), 255, cv::FILLED);
  cv::rectangle(windows_, cv::Rect(light_x + 1, horizon_y_ - 50, 5, 4), 255, cv::FILLED);
}

cv::Point2d HarbourScene::lantern_world(double t) const {
  const double s = t + p_.time_offset_s;
  const double x = p_.lantern_start_x + p_.lantern_speed_px_per_s * s;
  // Rises slowly while bobbing gently (0.4 Hz).
  const double y = p_.size.height * 0.42 - 4.0 * s + 3.0 * std::sin(2 * CV_PI * 0.4 * s);
  return {x, y};
}

cv::Rect2d HarbourScene::lantern_box(double t) const {
  const double camera_x = p_.camera_start_px + p_.pan_px_per_s * (t + p_.time_offset_s);
  const cv::Point2d c = lantern_world(t);
  return {c.x - camera_x - 13, c.y - 17, 26, 34};
}

void HarbourScene::draw_sky(cv::Mat& frame, double t, double camera_x) const {
  const cv::Vec3f top = rgb(34, 30, 82), middle = rgb(132, 72, 120), low = rgb(246, 150, 88);
  const cv::Mat clouds = view_of(sky_texture_, camera_x + 3.0 * (t + p_.time_offset_s), {p_.size.width, horizon_y_});
  const cv::Mat town = view_of(skyline_, camera_x, {p_.size.width, horizon_y_ + 1});
  const cv::Mat lit = view_of(windows_, camera_x, {p_.size.width, horizon_y_ + 1});
  for (int y = 0; y < horizon_y_; ++y) {
    const double v = static_cast<double>(y) / horizon_y_;
    const cv::Vec3f base = v < 0.55 ? mix(top, middle, v / 0.55) : mix(middle, low, (v - 0.55) / 0.45);
    for (int x = 0; x < p_.size.width; ++x) {
      // Thin pink clouds where the noise is high, denser near the horizon.
      const double density = std::clamp((clouds.at<float>(y, x) - 0.6) * 0.45, 0.0, 0.5) * (0.3 + v);
      cv::Vec3f c = mix(base, rgb(236, 140, 150), density);
      const double shore = town.at<uint8_t>(y, x) / 255.0;
      c = mix(c, rgb(28, 22, 40), shore);
      c = mix(c, rgb(255, 206, 120), lit.at<uint8_t>(y, x) / 255.0);
      frame.at<cv::Vec3f>(y, x) = c;
    }
  }
}

void HarbourScene::draw_water(cv::Mat& frame, double t, double camera_x) const {
  const int rows = p_.size.height - horizon_y_;
  // Ripples drift slowly to the left on top of the pan.
  const cv::Mat ripple = view_of(water_texture_, camera_x + 128 - 6.0 * (t + p_.time_offset_s), {p_.size.width, rows});
  const double lantern_x = lantern_world(t).x - camera_x;
  for (int y = 0; y < rows; ++y) {
    const double depth = static_cast<double>(y) / rows;
    const cv::Vec3f base = mix(rgb(150, 92, 96), rgb(18, 26, 58), std::pow(depth, 0.6));
    for (int x = 0; x < p_.size.width; ++x) {
      const float r = ripple.at<float>(y, x);
      cv::Vec3f c = base * static_cast<float>(1.0 + 0.16 * r * (0.4 + depth));
      // The lantern's reflection: a warm column broken up by the ripples.
      const double dx = (x - lantern_x) / (7.0 + 10.0 * depth);
      const double glow = std::exp(-dx * dx) * (1.0 - 0.8 * depth) * std::clamp(0.55 + 0.5 * r, 0.0, 1.0);
      c = mix(c, rgb(255, 170, 80), 0.55 * glow);
      frame.at<cv::Vec3f>(horizon_y_ + y, x) = c;
    }
  }
}

void HarbourScene::draw_lantern(cv::Mat& frame, double t, double camera_x) const {
  const cv::Point2d w = lantern_world(t);
  const double cx = w.x - camera_x, cy = w.y, ax = 13, ay = 17;
  double hue = 0;
  if (p_.drift_end_deg != 0 && t > p_.drift_start_s)
    hue = p_.drift_end_deg * (t - p_.drift_start_s) / (p_.duration_s - p_.drift_start_s);
  const cv::Vec3f core = rotate_hue(rgb(255, 222, 140), hue), edge = rotate_hue(rgb(222, 84, 40), hue);
  const cv::Vec3f halo = rotate_hue(rgb(255, 180, 90), hue);
  const cv::Rect area = cv::Rect(static_cast<int>(cx - 60), static_cast<int>(cy - 60), 121, 121) &
                        cv::Rect(0, 0, frame.cols, frame.rows);
  for (int y = area.y; y < area.y + area.height; ++y)
    for (int x = area.x; x < area.x + area.width; ++x) {
      const double dx = x + 0.5 - cx, dy = y + 0.5 - cy;
      cv::Vec3f& px = frame.at<cv::Vec3f>(y, x);
      // Soft glow around the lantern, added to the sky and water.
      const double g = std::exp(-(dx * dx + dy * dy) / (2 * 26.0 * 26.0));
      px = px + halo * static_cast<float>(0.35 * g);
      const double r = std::sqrt((dx / ax) * (dx / ax) + (dy / ay) * (dy / ay));
      const double inside = std::clamp((1.0 - r) * ax, 0.0, 1.0);  // ~1 px anti-aliased edge
      if (inside <= 0) continue;
      cv::Vec3f body = mix(core, edge, std::pow(r, 1.5));
      for (double rib : {-6.5, 0.0, 6.5})  // bamboo ribs
        body *= static_cast<float>(1.0 - 0.22 * std::exp(-(dx - rib) * (dx - rib) / 1.2));
      if (std::fabs(dy) > ay - 3.5 && std::fabs(dx) < 7) body = rgb(60, 34, 30);  // top and bottom rims
      px = mix(px, body, inside);
    }
}

cv::Mat HarbourScene::render(double t_s) const {
  const double camera_x = p_.camera_start_px + p_.pan_px_per_s * (t_s + p_.time_offset_s);
  cv::Mat frame(p_.size, CV_32FC3);
  draw_sky(frame, t_s, camera_x);
  draw_water(frame, t_s, camera_x);
  draw_lantern(frame, t_s, camera_x);
  // Dusk deepens slowly: a 6% fall of light over five seconds, a lighting
  // change a checker must not call flicker.
  frame *= 1.0 - 0.012 * (t_s + p_.time_offset_s);
  if (p_.close_up > 1) {
    // Crop around the lantern (kept inside the frame) and scale back up.
    const cv::Point2d c = lantern_world(t_s);
    const cv::Size2d crop(p_.size.width / p_.close_up, p_.size.height / p_.close_up);
    const double x = std::clamp(c.x - camera_x - crop.width / 2, 0.0, p_.size.width - crop.width);
    const double y = std::clamp(c.y - crop.height / 2, 0.0, p_.size.height - crop.height);
    cv::Mat zoomed;
    cv::resize(frame(cv::Rect(cv::Rect2d(x, y, crop.width, crop.height))), zoomed, p_.size, 0, 0, cv::INTER_CUBIC);
    frame = zoomed;
  }
  cv::Mat out;
  frame.convertTo(out, CV_8UC3, 255.0);
  return out;
}

}  // namespace lanternfish
