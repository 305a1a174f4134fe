// CIELAB conversion (analyzer/color/color_space.*) against two outside
// implementations on random colours:
//  - scikit-image's skimage.color.rgb2lab (Debian python3-skimage, D65/2deg),
//    run through /usr/bin/python3;
//  - OpenCV's cv::cvtColor(COLOR_RGB2Lab) on CV_32F input.
// Both use slightly different matrix digits and white point than the
// IEC 61966-2-1 values we use (skimage: 0.412453..., white 0.95047/1.08883;
// OpenCV: its own D65 table), so agreement is to a stated tolerance, not
// exact: 0.05 in L*, a*, b* for skimage (observed max about 0.02). OpenCV
// 4.6's float path goes through lookup tables with interpolation (its
// outputs come quantised, e.g. a* = 59.671875): observed max 0.30 and mean
// 0.075 per component on these colours. We require 0.4 per component,
// CIEDE2000 < 0.5 at worst and a mean |difference| below 0.1, so a
// systematic error (wrong white, wrong matrix: > 1 unit) would still show.
#include <gtest/gtest.h>

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <random>
#include <string>
#include <vector>

#include <opencv2/imgproc.hpp>

#include "analyzer/color/ciede2000.h"
#include "analyzer/color/color_space.h"

namespace {

using namespace clipwarden::color;

std::vector<Rgb> random_colours(int n, unsigned seed) {
  std::mt19937 rng(seed);
  std::uniform_real_distribution<double> unit(0.0, 1.0);
  std::vector<Rgb> colours;
  for (int i = 0; i < n; ++i) colours.push_back({unit(rng), unit(rng), unit(rng)});
  // Corners of the cube and greys, where the companding branches meet.
  for (double v : {0.0, 0.01, 0.04045, 0.05, 0.5, 1.0}) colours.push_back({v, v, v});
  colours.push_back({1, 0, 0});
  colours.push_back({0, 1, 0});
  colours.push_back({0, 0, 1});
  return colours;
}

TEST(ColorLabReference, AgreesWithScikitImageRgb2lab) {
  const char* python = "/usr/bin/python3";
  if (!std::filesystem::exists(python)) GTEST_SKIP() << "no /usr/bin/python3";
  if (std::system("/usr/bin/python3 -c 'import skimage.color' 2>/dev/null") != 0) {
    GTEST_SKIP() << "scikit-image (Debian python3-skimage) is not installed";
  }
  const auto colours = random_colours(500, 11);
  const auto dir = std::filesystem::temp_directory_path() /
                   ("clipwarden_lab_" + std::to_string(::testing::UnitTest::GetInstance()->random_seed()) +
                    "_" + std::to_string(reinterpret_cast<uintptr_t>(&colours)));
  std::filesystem::create_directories(dir);
  const auto in_path = dir / "rgb.txt";
  const auto out_path = dir / "lab.txt";
  {
    std::ofstream out(in_path);
    out.precision(17);
    for (const auto& c : colours) out << c.r << ' ' << c.g << ' ' << c.b << '\n';
  }
  const std::string script =
      "import numpy as np, sys; from skimage.color import rgb2lab; "
      "x = np.loadtxt(sys.argv[1]).reshape(-1, 1, 3); "
      "np.savetxt(sys.argv[2], rgb2lab(x).reshape(-1, 3), fmt='%.10f')";
  const std::string cmd = std::string(python) + " -c \"" + script + "\" " + in_path.string() +
                          " " + out_path.string();
  ASSERT_EQ(std::system(cmd.c_str()), 0) << cmd;
  std::ifstream in(out_path);
  double worst = 0;
  for (const auto& c : colours) {
    Lab ref;
    ASSERT_TRUE(in >> ref.l >> ref.a >> ref.b);
    const Lab ours = srgb_to_lab(c);
    EXPECT_NEAR(ours.l, ref.l, 0.05);
    EXPECT_NEAR(ours.a, ref.a, 0.05);
    EXPECT_NEAR(ours.b, ref.b, 0.05);
    worst = std::max(worst, ciede2000(ours, ref));
  }
  EXPECT_LT(worst, 0.05) << "largest CIEDE2000 between ours and scikit-image";
  std::filesystem::remove_all(dir);
}

TEST(ColorLabReference, AgreesWithOpenCvCvtColorFloat) {
  const auto colours = random_colours(2000, 12);
  cv::Mat rgb(static_cast<int>(colours.size()), 1, CV_32FC3);
  for (int i = 0; i < rgb.rows; ++i) {
    rgb.at<cv::Vec3f>(i) = cv::Vec3f(static_cast<float>(colours[i].r),
                                     static_cast<float>(colours[i].g),
                                     static_cast<float>(colours[i].b));
  }
  cv::Mat lab;
  cv::cvtColor(rgb, lab, cv::COLOR_RGB2Lab);
  double worst = 0, sum_abs = 0;
  for (int i = 0; i < rgb.rows; ++i) {
    const cv::Vec3f ref = lab.at<cv::Vec3f>(i);
    const Lab ours = srgb_to_lab(colours[i]);
    EXPECT_NEAR(ours.l, ref[0], 0.4) << i;
    EXPECT_NEAR(ours.a, ref[1], 0.4) << i;
    EXPECT_NEAR(ours.b, ref[2], 0.4) << i;
    sum_abs += std::abs(ours.l - ref[0]) + std::abs(ours.a - ref[1]) + std::abs(ours.b - ref[2]);
    worst = std::max(worst, ciede2000(ours, {ref[0], ref[1], ref[2]}));
  }
  EXPECT_LT(worst, 0.5) << "largest CIEDE2000 between ours and OpenCV";
  EXPECT_LT(sum_abs / (3.0 * rgb.rows), 0.1) << "mean |difference| per component";
}

}  // namespace
