#include "analyzer/drift/illumination_fit.h"

#include <algorithm>
#include <cmath>

namespace framelint::drift {
namespace {

constexpr float kClipLow = 1.5f / 255.0f;
constexpr float kClipHigh = 253.5f / 255.0f;
constexpr int kIterations = 6;
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
                          std::vector<float>& scratch, int min_samples) {
  // Start from a pure offset (median difference), robust to outliers.
  scratch.clear();
  for (size_t i = 0; i < ref.size(); ++i) {
    if (usable(ref[i][c], cur[i][c])) scratch.push_back(cur[i][c] - ref[i][c]);
  }
  if (static_cast<int>(scratch.size()) < min_samples) return {};
  ChannelAffine fit{1.0f, median_in_place(scratch)};
  for (int iter = 0; iter < kIterations; ++iter) {
    scratch.clear();
    for (size_t i = 0; i < ref.size(); ++i) {
      if (!usable(ref[i][c], cur[i][c])) continue;
      scratch.push_back(std::abs(cur[i][c] - (fit.gain * ref[i][c] + fit.offset)));
    }
    const float scale = std::max(kMinScale, 1.4826f * median_in_place(scratch));
    const float cutoff = kTukeyC * scale;
    double sw = 0, sx = 0, sy = 0, sxx = 0, sxy = 0;
    for (size_t i = 0; i < ref.size(); ++i) {
      const float x = ref[i][c], y = cur[i][c];
      if (!usable(x, y)) continue;
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
  for (int c = 0; c < 3; ++c) {
    map.channel[c] = fit_channel(reference.first(n), current.first(n), c, scratch, min_samples);
  }
  return map;
}

}  // namespace framelint::drift
