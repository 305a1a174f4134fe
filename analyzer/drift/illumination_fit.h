// The global illumination / colour change of the whole frame, fitted so it
// can be taken out before an object's colour is called drift: a sunset, an
// exposure ramp or a colour cast moves every surface the same way.
//
// Model: per channel, an affine map on sRGB-encoded values,
// cur = gain * ref + offset. It is exact for a gain or an offset applied to
// encoded values (grading, brightness edits) and, above the short linear toe
// of the sRGB curve, also for a gain in linear light (exposure, light
// intensity): ((k*L)^(1/2.4)) * 1.055 - 0.055 = k^(1/2.4) * (s + 0.055) - 0.055.
// Per-channel gains cover a change of the illuminant's colour (von Kries).
#pragma once

#include <array>
#include <span>
#include <vector>

#include <opencv2/core.hpp>

namespace clipwarden::drift {

struct ChannelAffine {
  float gain = 1;
  float offset = 0;
};

struct IlluminationMap {
  std::array<ChannelAffine, 3> channel;  // B, G, R (OpenCV order)

  // Predicted current colour of a reference colour, clamped to [0,1] (a
  // saturated highlight cannot get brighter).
  cv::Vec3f apply(const cv::Vec3f& ref) const;
  // The reference colour that maps to `cur`, for points seeded mid-shot.
  cv::Vec3f invert(const cv::Vec3f& cur) const;
  // Mean gain over the channels (contrast change of gradients in gray).
  float mean_gain() const;
};

// Robust fit over pairs (reference colour, current colour), both encoded
// sRGB in [0,1]: Tukey-biweight IRLS (Beaton & Tukey 1974; c = 4.685 with a
// MAD scale) so that points whose own colour drifted are outliers. Samples
// clipped at 0 or 1 in either colour are left out. Identity if fewer than
// `min_samples` usable pairs. `scratch` is reused between calls.
IlluminationMap fit_illumination(std::span<const cv::Vec3f> reference,
                                 std::span<const cv::Vec3f> current, std::vector<float>& scratch,
                                 int min_samples = 24);

}  // namespace clipwarden::drift
