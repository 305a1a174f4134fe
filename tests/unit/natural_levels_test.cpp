// Natural levels (analyzer/metrics/natural_levels.h): the interpolation
// between bin centres, worked by hand from the kept table, and the
// derivation's quantile rule on a hand-made set of clean pairs.
#include <gtest/gtest.h>

#include <cmath>

#include "analyzer/metrics/natural_levels.h"
#include "support/natural_calibration.h"

using namespace clipwarden;

TEST(NaturalLevels, InterpolatesInLogMotionBetweenBinCentres) {
  const auto bins = natural_bins();
  ASSERT_GE(bins.size(), 3u);
  const NaturalBin& a = bins[1];
  const NaturalBin& b = bins[2];
  const double ca = std::sqrt(a.motion_from_px * a.motion_to_px);  // geometric centres
  const double cb = std::sqrt(b.motion_from_px * b.motion_to_px);
  EXPECT_NEAR(natural_level(NaturalMeasure::warp_error, ca), a.level[0], 1e-12);
  EXPECT_NEAR(natural_level(NaturalMeasure::warp_error, cb), b.level[0], 1e-12);
  // Half-way in log motion is half-way in level.
  EXPECT_NEAR(natural_level(NaturalMeasure::warp_error, std::sqrt(ca * cb)),
              (a.level[0] + b.level[0]) / 2, 1e-12);
  EXPECT_TRUE(std::isnan(natural_level(NaturalMeasure::warp_error, NAN)));
  EXPECT_TRUE(std::isnan(natural_ratio(NaturalMeasure::warp_error, NAN, 1.0)));
  EXPECT_NEAR(natural_ratio(NaturalMeasure::warp_error, 2 * a.level[0], ca), 2.0, 1e-12);
}

TEST(NaturalLevels, LevelsNeverFallAsMotionGrows) {
  const auto bins = natural_bins();
  for (size_t i = 1; i < bins.size(); ++i)
    for (int k = 0; k < kNaturalMeasures; ++k)
      EXPECT_GE(bins[i].level[k], bins[i - 1].level[k]) << i << " " << k;
}

TEST(NaturalLevels, DerivationTakesThe99thPercentilePerBin) {
  // One clean clip of 200 pairs all in the second bin, warp errors 0.001,
  // 0.002, ..., 0.200: each pair weighs 60/200, and the smallest value whose
  // cumulative weight reaches 99% of the total is the 198th, 0.198.
  const auto bins = natural_bins();
  const double motion = std::sqrt(bins[1].motion_from_px * bins[1].motion_to_px);
  Report r;
  r.series.push_back({"motion_px", std::vector<double>(200, motion)});
  r.series.push_back({"warp_error", {}});
  for (int i = 1; i <= 200; ++i) r.series.back().values.push_back(i / 1000.0);
  const auto derived = calibration::derive_natural_levels({&r});
  EXPECT_EQ(derived[1].pairs, 200);
  EXPECT_NEAR(derived[1].level[0], 0.198, 1e-12);
  // The empty first bin takes its neighbour's level; later empty bins keep it.
  EXPECT_NEAR(derived[0].level[0], 0.198, 1e-12);
  EXPECT_NEAR(derived.back().level[0], 0.198, 1e-12);
}
