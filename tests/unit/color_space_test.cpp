// Colour-space conversions (analyzer/color/color_space.*). Outside sources:
// the sRGB transfer function and matrix of IEC 61966-2-1:1999, CIE 15:2004
// for L*a*b*. The comparison with scikit-image / OpenCV on random colours
// lives in tests/reference/color_lab_reference_test.cpp.
#include <gtest/gtest.h>

#include <random>

#include "analyzer/color/color_space.h"

namespace {

using namespace clipwarden::color;

TEST(ColorSpace, SrgbTransferFunctionKnownValues) {
  // IEC 61966-2-1: the linear segment below 0.04045 has slope 1/12.92 and the
  // curve passes through (1, 1). 0.5 encoded -> 0.214041 linear (the value
  // follows from the standard's formula: ((0.5 + 0.055) / 1.055)^2.4).
  EXPECT_DOUBLE_EQ(srgb_to_linear(0.0), 0.0);
  EXPECT_NEAR(srgb_to_linear(1.0), 1.0, 1e-12);
  EXPECT_NEAR(srgb_to_linear(0.04), 0.04 / 12.92, 1e-15);
  EXPECT_NEAR(srgb_to_linear(0.5), 0.2140411404, 1e-9);
  for (double v = 0; v <= 1.0; v += 0.01) EXPECT_NEAR(linear_to_srgb(srgb_to_linear(v)), v, 1e-12);
}

TEST(ColorSpace, WhiteAndPrimariesInLab) {
  // sRGB white is the reference white: L* = 100, a* = b* = 0 (CIE 15:2004).
  const Lab white = srgb_to_lab({1, 1, 1});
  EXPECT_NEAR(white.l, 100.0, 1e-9);
  EXPECT_NEAR(white.a, 0.0, 1e-9);
  EXPECT_NEAR(white.b, 0.0, 1e-9);
  // Relative luminance of the sRGB primaries is the matrix's middle row
  // (IEC 61966-2-1: 0.2126, 0.7152, 0.0722).
  EXPECT_NEAR(linear_rgb_to_xyz({1, 0, 0}).y, 0.2126, 1e-12);
  EXPECT_NEAR(linear_rgb_to_xyz({0, 1, 0}).y, 0.7152, 1e-12);
  EXPECT_NEAR(linear_rgb_to_xyz({0, 0, 1}).y, 0.0722, 1e-12);
  // Black is L* = 0.
  EXPECT_NEAR(srgb_to_lab({0, 0, 0}).l, 0.0, 1e-12);
}

TEST(ColorSpace, LabRoundTripOnRandomColours) {
  std::mt19937 rng(7);
  std::uniform_real_distribution<double> unit(0.0, 1.0);
  for (int i = 0; i < 2000; ++i) {
    const Rgb c{unit(rng), unit(rng), unit(rng)};
    const Rgb back = lab_to_srgb(srgb_to_lab(c));
    EXPECT_NEAR(back.r, c.r, 1e-9);
    EXPECT_NEAR(back.g, c.g, 1e-9);
    EXPECT_NEAR(back.b, c.b, 1e-9);
  }
}

// The table-driven transfer function used in per-point loops stays within
// 1e-6 of the IEC 61966-2-1 formula, and so within 1e-4 in L*a*b*.
TEST(ColorSpace, TableTransferFunctionMatchesFormula) {
  for (int i = 0; i <= 100000; ++i) {
    const double v = i / 100000.0;
    ASSERT_NEAR(srgb_to_linear_table(v), srgb_to_linear(v), 1e-6) << v;
  }
  std::mt19937 rng(5);
  std::uniform_real_distribution<double> unit(0.0, 1.0);
  for (int i = 0; i < 1000; ++i) {
    const Rgb c{unit(rng), unit(rng), unit(rng)};
    const Lab exact = srgb_to_lab(c), fast = srgb_to_lab_fast(c);
    EXPECT_NEAR(fast.l, exact.l, 1e-4);
    EXPECT_NEAR(fast.a, exact.a, 1e-4);
    EXPECT_NEAR(fast.b, exact.b, 1e-4);
  }
}

TEST(ColorSpace, HueAndChroma) {
  EXPECT_NEAR(lab_hue_deg({50, 0, 10}), 90.0, 1e-12);
  EXPECT_NEAR(lab_hue_deg({50, 0, -10}), 270.0, 1e-12);
  EXPECT_NEAR(lab_chroma({50, 3, 4}), 5.0, 1e-12);
}

}  // namespace
