#include "analyzer/drift/illumination_fit.h"

#include <algorithm>
#include <cmath>

namespace clipwarden::drift {
namespace {

constexpr float kClipLow = 1.5f / 255.0f;
constexpr float kClipHigh = 253.5f / 255.0f;
constexpr int kFitIterations = 6;
constexpr float kTukeyC = 4.685f;
constexpr float kMinScale = 0.004f;  // about one 8-bit code value

float median_in_place(std::vector<float>& v) {
  if (v.empty()) return 0;
  auto mid = v.begin() + static_cast<std::ptrdiff_t>(v.size() / 2);
  std::nth_element(v.begin(), mid, v.end());
  return *mid;
}

bool usable(float ref, float cur) {
  return ref > kClipLow && ref < kClipHigh && cur > kClipLow && cur < kClipHigh;
}

ChannelAffine fit_channel(std::span<const cv::Vec3f> ref, std::span<const cv::Vec3f> cur, int c,
                          std::vector<float>& scratch, std::vector<cv::Vec2f>& samples,
                          int min_samples) {
  // The usable (reference, current) values of the channel, in input order,
  // gathered once for all iterations.
  samples.clear();
  for (size_t i = 0; i < ref.size(); ++i) {
    if (usable(ref[i][c], cur[i][c])) samples.emplace_back(ref[i][c], cur[i][c]);
  }
  // Start from a pure offset (median difference), robust to outliers.
  scratch.clear();
  for (const cv::Vec2f& s : samples) scratch.push_back(s[1] - s[0]);
  if (static_cast<int>(scratch.size()) < min_samples) return {};
  ChannelAffine fit{1.0f, median_in_place(scratch)};
  for (int iter = 0; iter < kFitIterations; ++iter) {
    scratch.clear();
    for (const cv::Vec2f& s : samples)
      scratch.push_back(std::abs(s[1] - (fit.gain * s[0] + fit.offset)));
    const float scale = std::max(kMinScale, 1.4826f * median_in_place(scratch));
    const float cutoff = kTukeyC * scale;
    double sw = 0, sx = 0, sy = 0, sxx = 0, sxy = 0;
    for (const cv::Vec2f& s : samples) {
      const float x = s[0], y = s[1];
      const float u = (y - (fit.gain * x + fit.offset)) / cutoff;
      if (std::abs(u) >= 1) continue;
      const double w = (1 - u * u) * (1 - u * u);
      sw += w, sx += w * x, sy += w * y, sxx += w * x * x, sxy += w * x * y;
    }
    if (sw <= 0) break;
    const double var_x = sxx - sx * sx / sw;
    // A narrow spread of reference values cannot pin a gain: fit an offset.
    if (var_x < 1e-4 * sw) {
      fit = {1.0f, static_cast<float>((sy - sx) / sw)};
      continue;
    }
    const double gain = std::clamp((sxy - sx * sy / sw) / var_x, 0.2, 5.0);
    fit = {static_cast<float>(gain), static_cast<float>((sy - gain * sx) / sw)};
  }
  return fit;
}

}  // namespace

cv::Vec3f IlluminationMap::apply(const cv::Vec3f& ref) const {
  cv::Vec3f out;
  for (int c = 0; c < 3; ++c) {
    out[c] = std::clamp(channel[c].gain * ref[c] + channel[c].offset, 0.0f, 1.0f);
  }
  return out;
}

cv::Vec3f IlluminationMap::invert(const cv::Vec3f& cur) const {
  cv::Vec3f out;
  for (int c = 0; c < 3; ++c) out[c] = (cur[c] - channel[c].offset) / channel[c].gain;
  return out;
}

float IlluminationMap::mean_gain() const {
  return (channel[0].gain + channel[1].gain + channel[2].gain) / 3.0f;
}

IlluminationMap fit_illumination(std::span<const cv::Vec3f> reference,
                                 std::span<const cv::Vec3f> current, std::vector<float>& scratch,
                                 int min_samples) {
  IlluminationMap map;
  const size_t n = std::min(reference.size(), current.size());
  // Reused: no allocation per frame.
  thread_local std::vector<cv::Vec2f> samples;
  for (int c = 0; c < 3; ++c) {
    map.channel[c] =
        fit_channel(reference.first(n), current.first(n), c, scratch, samples, min_samples);
  }
  return map;
}

}  // namespace clipwarden::drift
