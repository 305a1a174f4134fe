#include "analyzer/color/color_space.h"

#include <algorithm>
#include <array>
#include <cmath>

namespace clipwarden::color {
namespace {

// CIE 15:2004 constants of the L*a*b* companding function.
constexpr double kEpsilon = 216.0 / 24389.0;  // (6/29)^3
constexpr double kKappa = 24389.0 / 27.0;     // (29/3)^3

double lab_f(double t) { return t > kEpsilon ? std::cbrt(t) : (kKappa * t + 16.0) / 116.0; }

double lab_f_inverse(double f) {
  const double cube = f * f * f;
  return cube > kEpsilon ? cube : (116.0 * f - 16.0) / kKappa;
}

}  // namespace

double srgb_to_linear(double encoded) {
  if (encoded <= 0.04045) return encoded / 12.92;
  return std::pow((encoded + 0.055) / 1.055, 2.4);
}

double linear_to_srgb(double linear) {
  if (linear <= 0.0031308) return linear * 12.92;
  return 1.055 * std::pow(linear, 1.0 / 2.4) - 0.055;
}

Rgb srgb_to_linear(const Rgb& c) {
  return {srgb_to_linear(c.r), srgb_to_linear(c.g), srgb_to_linear(c.b)};
}

Rgb linear_to_srgb(const Rgb& c) {
  return {linear_to_srgb(c.r), linear_to_srgb(c.g), linear_to_srgb(c.b)};
}

// IEC 61966-2-1:1999 RGB -> XYZ matrix. The inverse is the exact inverse of
// that matrix (the standard's own 4-digit inverse is not, and round trips
// would lose about 1e-4).
Xyz linear_rgb_to_xyz(const Rgb& c) {
  return {0.4124 * c.r + 0.3576 * c.g + 0.1805 * c.b,
          0.2126 * c.r + 0.7152 * c.g + 0.0722 * c.b,
          0.0193 * c.r + 0.1192 * c.g + 0.9505 * c.b};
}

Rgb xyz_to_linear_rgb(const Xyz& c) {
  return {3.240625477320 * c.x - 1.537207972210 * c.y - 0.498628598698 * c.z,
          -0.968930714729 * c.x + 1.875756060885 * c.y + 0.041517523843 * c.z,
          0.055710120446 * c.x - 0.204021050598 * c.y + 1.056995942254 * c.z};
}

Lab xyz_to_lab(const Xyz& c, const Xyz& white) {
  const double fx = lab_f(c.x / white.x);
  const double fy = lab_f(c.y / white.y);
  const double fz = lab_f(c.z / white.z);
  return {116.0 * fy - 16.0, 500.0 * (fx - fy), 200.0 * (fy - fz)};
}

Xyz lab_to_xyz(const Lab& c, const Xyz& white) {
  const double fy = (c.l + 16.0) / 116.0;
  const double fx = fy + c.a / 500.0;
  const double fz = fy - c.b / 200.0;
  return {white.x * lab_f_inverse(fx), white.y * lab_f_inverse(fy), white.z * lab_f_inverse(fz)};
}

double srgb_to_linear_table(double encoded) {
  constexpr int kSize = 4096;
  static const std::array<double, kSize + 1> table = [] {
    std::array<double, kSize + 1> t{};
    for (int i = 0; i <= kSize; ++i) t[i] = srgb_to_linear(static_cast<double>(i) / kSize);
    return t;
  }();
  const double x = std::clamp(encoded, 0.0, 1.0) * kSize;
  const int i = std::min(static_cast<int>(x), kSize - 1);
  const double f = x - i;
  return table[i] + f * (table[i + 1] - table[i]);
}

Lab srgb_to_lab_fast(const Rgb& c) {
  return xyz_to_lab(linear_rgb_to_xyz(
      {srgb_to_linear_table(c.r), srgb_to_linear_table(c.g), srgb_to_linear_table(c.b)}));
}

Lab srgb_to_lab(const Rgb& encoded) {
  return xyz_to_lab(linear_rgb_to_xyz(srgb_to_linear(encoded)));
}

Rgb lab_to_srgb(const Lab& lab) { return linear_to_srgb(xyz_to_linear_rgb(lab_to_xyz(lab))); }

double lab_chroma(const Lab& c) { return std::hypot(c.a, c.b); }

double lab_hue_deg(const Lab& c) {
  if (c.a == 0 && c.b == 0) return 0;
  const double h = std::atan2(c.b, c.a) * 180.0 / M_PI;
  return h < 0 ? h + 360.0 : h;
}

}  // namespace clipwarden::color
