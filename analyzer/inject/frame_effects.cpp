#include "analyzer/inject/frame_effects.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <vector>

#include <opencv2/imgproc.hpp>

#include "analyzer/color/relative_luminance.h"

namespace clipwarden::inject {
namespace {

// Linear light in [0, 1] -> 8-bit sRGB code, on a 65536-step grid: fine
// enough that the rounding stays below 0.06 of a code value even at the
// steep foot of the curve (slope 12.92 * 255 per unit of linear light).
constexpr int kLinearSteps = 65535;

const std::vector<uint8_t>& linear_to_srgb8_table() {
  static const std::vector<uint8_t> table = [] {
    std::vector<uint8_t> t(kLinearSteps + 1);
    for (int i = 0; i <= kLinearSteps; ++i) {
      const double lin = static_cast<double>(i) / kLinearSteps;
      // IEC 61966-2-1 encoding curve.
      const double enc = lin <= 0.0031308 ? 12.92 * lin : 1.055 * std::pow(lin, 1 / 2.4) - 0.055;
      t[i] = static_cast<uint8_t>(std::lround(std::clamp(enc, 0.0, 1.0) * 255));
    }
    return t;
  }();
  return table;
}

inline uint8_t encode_linear(float lin) {
  const float clamped = std::clamp(lin, 0.0f, 1.0f);
  return linear_to_srgb8_table()[static_cast<size_t>(std::lround(clamped * kLinearSteps))];
}

// The weight of pixel (x, y) of the roi.
inline float weight_at(const SoftMask& mask, int x, int y) {
  return mask.weight.empty() ? 1.0f : mask.weight.at<float>(y, x);
}

// Applies f(linear_value, weight) -> linear_value to every channel of the
// roi's pixels whose weight is above zero.
template <class F>
void map_linear(cv::Mat& bgr, const SoftMask& mask, F f) {
  const auto& lin = srgb8_to_linear_table();
  for (int y = 0; y < mask.roi.height; ++y) {
    uint8_t* px = bgr.ptr<uint8_t>(mask.roi.y + y) + 3 * mask.roi.x;
    for (int x = 0; x < mask.roi.width; ++x, px += 3) {
      const float w = weight_at(mask, x, y);
      if (w <= 0) continue;
      for (int c = 0; c < 3; ++c) px[c] = encode_linear(f(lin[px[c]], w));
    }
  }
}

}  // namespace

SoftMask whole_frame(cv::Size frame) { return {cv::Rect(0, 0, frame.width, frame.height), {}}; }

SoftMask feathered_ellipse(cv::Size frame, const cv::Rect2d& box, double feather) {
  const cv::Rect full(0, 0, frame.width, frame.height);
  const cv::Rect covered(static_cast<int>(std::floor(box.x)), static_cast<int>(std::floor(box.y)),
                         static_cast<int>(std::ceil(box.x + box.width)) - static_cast<int>(std::floor(box.x)),
                         static_cast<int>(std::ceil(box.y + box.height)) - static_cast<int>(std::floor(box.y)));
  SoftMask mask;
  mask.roi = covered & full;
  if (mask.roi.empty()) return mask;
  mask.weight.create(mask.roi.size(), CV_32FC1);
  const double cx = box.x + box.width / 2, cy = box.y + box.height / 2;
  const double rx = std::max(box.width / 2, 0.5), ry = std::max(box.height / 2, 0.5);
  const double band = std::max(feather, 1e-6);
  for (int y = 0; y < mask.roi.height; ++y) {
    float* w = mask.weight.ptr<float>(y);
    for (int x = 0; x < mask.roi.width; ++x) {
      const double dx = (mask.roi.x + x + 0.5 - cx) / rx, dy = (mask.roi.y + y + 0.5 - cy) / ry;
      const double r = std::sqrt(dx * dx + dy * dy);
      w[x] = static_cast<float>(std::clamp((1.0 - r) / band, 0.0, 1.0));
    }
  }
  return mask;
}

void scale_linear_light(cv::Mat& bgr, double gain, const SoftMask& mask) {
  const float g1 = static_cast<float>(gain - 1.0);
  map_linear(bgr, mask, [g1](float v, float w) { return v * (1.0f + g1 * w); });
}

void blend_toward_white(cv::Mat& bgr, double alpha) {
  const float a = static_cast<float>(std::clamp(alpha, 0.0, 1.0));
  map_linear(bgr, whole_frame(bgr.size()), [a](float v, float) { return v + a * (1.0f - v); });
}

cv::Mat smooth_noise_field(cv::Size size, double grain_px, cv::RNG& rng) {
  const double grain = std::max(grain_px, 0.5);
  const cv::Size coarse(std::max(2, static_cast<int>(std::ceil(size.width / grain)) + 1),
                        std::max(2, static_cast<int>(std::ceil(size.height / grain)) + 1));
  cv::Mat small(coarse, CV_32FC1);
  rng.fill(small, cv::RNG::NORMAL, 0.0, 1.0);
  cv::Mat field;
  cv::resize(small, field, size, 0, 0, cv::INTER_CUBIC);
  cv::Scalar mean, stddev;
  cv::meanStdDev(field, mean, stddev);
  field = (field - mean[0]) / std::max(stddev[0], 1e-6);
  return field;
}

void add_noise(cv::Mat& bgr, const cv::Mat& field, double sigma, const SoftMask& mask) {
  CV_Assert(field.type() == CV_32FC1 && field.size() == mask.roi.size());
  for (int y = 0; y < mask.roi.height; ++y) {
    uint8_t* px = bgr.ptr<uint8_t>(mask.roi.y + y) + 3 * mask.roi.x;
    const float* n = field.ptr<float>(y);
    for (int x = 0; x < mask.roi.width; ++x, px += 3) {
      const float delta = static_cast<float>(sigma) * n[x] * weight_at(mask, x, y);
      for (int c = 0; c < 3; ++c) px[c] = cv::saturate_cast<uint8_t>(px[c] + delta);
    }
  }
}

cv::Vec3d mean_lab(const cv::Mat& bgr, const SoftMask& mask) {
  cv::Mat roi_float, lab;
  bgr(mask.roi).convertTo(roi_float, CV_32FC3, 1.0 / 255);
  cv::cvtColor(roi_float, lab, cv::COLOR_BGR2Lab);
  cv::Mat inside;
  if (!mask.weight.empty()) inside = mask.weight >= 0.5f;
  const cv::Scalar m = cv::mean(lab, inside);
  return {m[0], m[1], m[2]};
}

void shift_chroma(cv::Mat& bgr, cv::Vec2d delta_ab, const SoftMask& mask) {
  cv::Mat roi_float, lab;
  bgr(mask.roi).convertTo(roi_float, CV_32FC3, 1.0 / 255);
  cv::cvtColor(roi_float, lab, cv::COLOR_BGR2Lab);
  for (int y = 0; y < lab.rows; ++y) {
    cv::Vec3f* p = lab.ptr<cv::Vec3f>(y);
    for (int x = 0; x < lab.cols; ++x) {
      const float w = weight_at(mask, x, y);
      p[x][1] += static_cast<float>(delta_ab[0]) * w;
      p[x][2] += static_cast<float>(delta_ab[1]) * w;
    }
  }
  cv::cvtColor(lab, roi_float, cv::COLOR_Lab2BGR);
  cv::Mat shifted;
  roi_float.convertTo(shifted, CV_8UC3, 255.0);  // saturates out-of-gamut values
  shifted.copyTo(bgr(mask.roi));
}

void scale_about(cv::Mat& bgr, cv::Point2d centre, double scale, const SoftMask& mask) {
  cv::Mat map_x(mask.roi.size(), CV_32FC1), map_y(mask.roi.size(), CV_32FC1);
  for (int y = 0; y < mask.roi.height; ++y)
    for (int x = 0; x < mask.roi.width; ++x) {
      // Output pixel p shows the source at c + (p - c) / s.
      map_x.at<float>(y, x) = static_cast<float>(centre.x + (mask.roi.x + x - centre.x) / scale);
      map_y.at<float>(y, x) = static_cast<float>(centre.y + (mask.roi.y + y - centre.y) / scale);
    }
  cv::Mat scaled;
  cv::remap(bgr, scaled, map_x, map_y, cv::INTER_LINEAR, cv::BORDER_REPLICATE);
  cv::Mat roi = bgr(mask.roi);
  for (int y = 0; y < roi.rows; ++y)
    for (int x = 0; x < roi.cols; ++x) {
      const float w = weight_at(mask, x, y);
      cv::Vec3b& o = roi.at<cv::Vec3b>(y, x);
      const cv::Vec3b& s = scaled.at<cv::Vec3b>(y, x);
      for (int c = 0; c < 3; ++c) o[c] = cv::saturate_cast<uint8_t>(o[c] + w * (s[c] - o[c]));
    }
}

void fade_into_surroundings(cv::Mat& bgr, const SoftMask& mask, double amount) {
  if (mask.roi.empty() || amount <= 0) return;
  // Work on the roi grown by its own size on each side, so the fill sees the
  // surroundings; normalized convolution: blur(I * k) / blur(k) with k = 1 - w.
  const cv::Rect full(0, 0, bgr.cols, bgr.rows);
  const cv::Rect area =
      cv::Rect(mask.roi.x - mask.roi.width, mask.roi.y - mask.roi.height, 3 * mask.roi.width, 3 * mask.roi.height) &
      full;
  cv::Mat keep(area.size(), CV_32FC1, cv::Scalar(1));
  cv::Mat w_full = mask.weight.empty() ? cv::Mat(mask.roi.size(), CV_32FC1, cv::Scalar(1)) : mask.weight;
  keep(mask.roi - area.tl()).setTo(0, w_full > 0);  // only untouched pixels feed the fill
  cv::Mat image;
  bgr(area).convertTo(image, CV_32FC3);
  std::vector<cv::Mat> channels;
  cv::split(image, channels);
  const double sigma = 0.35 * std::max(mask.roi.width, mask.roi.height);
  cv::Mat keep_blur;
  cv::GaussianBlur(keep, keep_blur, cv::Size(), sigma);
  for (auto& c : channels) {
    cv::GaussianBlur(c.mul(keep), c, cv::Size(), sigma);
    c = c / cv::max(keep_blur, 1e-4);
  }
  cv::Mat fill;
  cv::merge(channels, fill);
  cv::Mat roi = bgr(mask.roi);
  const cv::Mat fill_roi = fill(mask.roi - area.tl());
  const float a = static_cast<float>(std::clamp(amount, 0.0, 1.0));
  for (int y = 0; y < roi.rows; ++y)
    for (int x = 0; x < roi.cols; ++x) {
      const float w = a * w_full.at<float>(y, x);
      cv::Vec3b& o = roi.at<cv::Vec3b>(y, x);
      const cv::Vec3f& f = fill_roi.at<cv::Vec3f>(y, x);
      for (int c = 0; c < 3; ++c) o[c] = cv::saturate_cast<uint8_t>(o[c] + w * (f[c] - o[c]));
    }
}

void displace(cv::Mat& bgr, cv::Point2d shift) {
  const cv::Matx23d translation(1, 0, shift.x, 0, 1, shift.y);
  cv::Mat moved;
  cv::warpAffine(bgr, moved, translation, bgr.size(), cv::INTER_LINEAR, cv::BORDER_REPLICATE);
  bgr = moved;
}

double chroma_shift_for_de(const cv::Vec3d& lab, const cv::Vec2d& direction, double target_de) {
  if (target_de <= 0) return 0;
  auto de_at = [&](double m) {
    return color::ciede2000(as_lab(lab),
                            {lab[0], lab[1] + m * direction[0], lab[2] + m * direction[1]});
  };
  double lo = 0, hi = 1;
  while (de_at(hi) < target_de && hi < 512) hi *= 2;
  for (int i = 0; i < 50; ++i) {
    const double mid = (lo + hi) / 2;
    (de_at(mid) < target_de ? lo : hi) = mid;
  }
  return (lo + hi) / 2;
}

}  // namespace clipwarden::inject
