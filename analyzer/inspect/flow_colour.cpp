// The colour wheel and the mapping follow the construction published with
// the Middlebury flow benchmark (Baker et al., IJCV 2011); the segment
// lengths are the published ones. Written from the description, not copied.
#include "analyzer/inspect/flow_colour.h"

#include <cmath>
#include <numbers>

#include <opencv2/imgproc.hpp>

namespace clipwarden {
namespace {

std::array<Rgb8, 55> build_wheel() {
  // Each segment ramps one channel between two primaries/secondaries; the
  // ramp value at step i of n is floor(255 * i / n).
  constexpr int kRY = 15, kYG = 6, kGC = 4, kCB = 11, kBM = 13, kMR = 6;
  std::array<Rgb8, 55> wheel{};
  int k = 0;
  auto ramp = [](int i, int n) { return static_cast<uint8_t>(255 * i / n); };
  for (int i = 0; i < kRY; ++i) wheel[k++] = {255, ramp(i, kRY), 0};  // red -> yellow
  for (int i = 0; i < kYG; ++i)
    wheel[k++] = {uint8_t(255 - ramp(i, kYG)), 255, 0};               // yellow -> green
  for (int i = 0; i < kGC; ++i) wheel[k++] = {0, 255, ramp(i, kGC)};  // green -> cyan
  for (int i = 0; i < kCB; ++i) wheel[k++] = {0, uint8_t(255 - ramp(i, kCB)), 255};  // cyan -> blue
  for (int i = 0; i < kBM; ++i) wheel[k++] = {ramp(i, kBM), 0, 255};  // blue -> magenta
  for (int i = 0; i < kMR; ++i)
    wheel[k++] = {255, 0, uint8_t(255 - ramp(i, kMR))};  // magenta -> red
  return wheel;
}

}  // namespace

const std::array<Rgb8, 55>& flow_colour_wheel() {
  static const std::array<Rgb8, 55> wheel = build_wheel();
  return wheel;
}

Rgb8 flow_colour(double u, double v) {
  if (!std::isfinite(u) || !std::isfinite(v)) return {0, 0, 0};
  const auto& wheel = flow_colour_wheel();
  constexpr int n = 55;
  const double length = std::hypot(u, v);
  // The published coding measures the angle of the reversed vector, so that
  // flow pointing right starts the wheel at red and flow pointing down (image
  // y) lands on yellow. atan2 returns +pi or -pi for a vector pointing
  // exactly right depending on the sign of zero; both mean the same
  // direction, and the wheel starts there, so +pi is folded onto -pi.
  double angle = std::atan2(-v, -u);
  if (angle >= std::numbers::pi) angle = -std::numbers::pi;
  const double position = (angle / std::numbers::pi + 1.0) / 2.0 * (n - 1);  // [0, 54]
  const int k0 = static_cast<int>(std::floor(position));
  const int k1 = (k0 + 1) % n;
  const double f = position - k0;
  auto channel = [&](uint8_t c0, uint8_t c1) {
    double c = ((1.0 - f) * c0 + f * c1) / 255.0;
    // Saturation grows with length: white at zero, the pure hue at the
    // normalising length; longer vectors (only with a fixed normaliser) are
    // darkened.
    c = length <= 1.0 ? 1.0 - length * (1.0 - c) : c * 0.75;
    return static_cast<uint8_t>(255.0 * c);
  };
  return {channel(wheel[k0].r, wheel[k1].r), channel(wheel[k0].g, wheel[k1].g),
          channel(wheel[k0].b, wheel[k1].b)};
}

cv::Mat flow_to_bgr(const cv::Mat& flow, double max_length_px, double* used_max_px) {
  CV_Assert(flow.type() == CV_32FC2);
  double max_length = max_length_px;
  if (max_length <= 0) {
    for (int y = 0; y < flow.rows; ++y) {
      const auto* row = flow.ptr<cv::Vec2f>(y);
      for (int x = 0; x < flow.cols; ++x) {
        const double l = std::hypot(row[x][0], row[x][1]);
        if (std::isfinite(l) && l > max_length) max_length = l;
      }
    }
  }
  if (used_max_px) *used_max_px = max_length;
  const double scale = max_length > 1e-9 ? 1.0 / max_length : 0.0;  // all-zero flow: white
  cv::Mat out(flow.size(), CV_8UC3);
  for (int y = 0; y < flow.rows; ++y) {
    const auto* in = flow.ptr<cv::Vec2f>(y);
    auto* px = out.ptr<cv::Vec3b>(y);
    for (int x = 0; x < flow.cols; ++x) {
      const Rgb8 c = flow_colour(in[x][0] * scale, in[x][1] * scale);
      px[x] = {c.b, c.g, c.r};
    }
  }
  return out;
}

cv::Mat flow_colour_wheel_image(int size_px) {
  cv::Mat out(size_px, size_px, CV_8UC3, cv::Scalar(246, 244, 242));
  const double centre = (size_px - 1) / 2.0;
  const double radius = size_px / 2.0 - 2.0;
  for (int y = 0; y < size_px; ++y) {
    auto* px = out.ptr<cv::Vec3b>(y);
    for (int x = 0; x < size_px; ++x) {
      const double u = (x - centre) / radius, v = (y - centre) / radius;
      if (u * u + v * v > 1.0) continue;
      const Rgb8 c = flow_colour(u, v);
      px[x] = {c.b, c.g, c.r};
    }
  }
  const cv::Scalar axis(120, 120, 120);
  const int c = static_cast<int>(std::lround(centre));
  cv::line(out, {c, 2}, {c, size_px - 3}, axis, 1, cv::LINE_AA);
  cv::line(out, {2, c}, {size_px - 3, c}, axis, 1, cv::LINE_AA);
  return out;
}

}  // namespace clipwarden
