// Colour science for appearance comparisons: sRGB transfer function
// (IEC 61966-2-1:1999), linear sRGB <-> CIE XYZ (D65), and CIE 1976 L*a*b*
// (CIE 15:2004) relative to the D65 white. Pure functions on plain values.
#pragma once

namespace clipwarden::color {

// Colour triples. RGB components are in [0,1] (nominal range); XYZ is
// scaled so that the white point has Y = 1.
struct Rgb {
  double r = 0, g = 0, b = 0;
};
struct Xyz {
  double x = 0, y = 0, z = 0;
};
struct Lab {
  double l = 0, a = 0, b = 0;
};

// The D65 reference white in XYZ (Y = 1) as IEC 61966-2-1 tabulates it for
// sRGB; it is the image of RGB (1,1,1) under the standard's matrix, so sRGB
// white maps to a* = b* = 0 exactly.
inline constexpr Xyz kWhiteD65 = {0.9505, 1.0, 1.0890};

// sRGB electro-optical transfer function and its inverse (IEC 61966-2-1):
// linear = encoded / 12.92 below 0.04045, else ((encoded + 0.055) / 1.055)^2.4.
double srgb_to_linear(double encoded);
double linear_to_srgb(double linear);
Rgb srgb_to_linear(const Rgb& encoded);
Rgb linear_to_srgb(const Rgb& linear);

// Linear sRGB primaries with D65 white <-> XYZ (IEC 61966-2-1 matrix).
Xyz linear_rgb_to_xyz(const Rgb& linear);
Rgb xyz_to_linear_rgb(const Xyz& xyz);

// CIE 1976 L*a*b* (CIE 15:2004, with the exact constants 216/24389 and
// 24389/27 rather than the rounded 0.008856 / 903.3).
Lab xyz_to_lab(const Xyz& xyz, const Xyz& white = kWhiteD65);
Xyz lab_to_xyz(const Lab& lab, const Xyz& white = kWhiteD65);

// Shorthands for 8-bit-style encoded sRGB in [0,1].
Lab srgb_to_lab(const Rgb& encoded);
// The same through a 4096-entry table of the transfer function with linear
// interpolation (within 1e-6 of srgb_to_linear on [0,1]), for per-point use
// in loops; inputs are clamped to [0,1].
double srgb_to_linear_table(double encoded);
Lab srgb_to_lab_fast(const Rgb& encoded);
Rgb lab_to_srgb(const Lab& lab);

// CIELAB chroma and hue angle in degrees [0, 360).
double lab_chroma(const Lab& lab);
double lab_hue_deg(const Lab& lab);

}  // namespace clipwarden::color
