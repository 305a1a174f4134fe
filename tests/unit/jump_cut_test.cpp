// jump_cut's series from the cut series, worked by hand against the
// definition in analyzer/metrics/cut_metric.cpp (our own rule; the numbers
// below are the readings of an injected 4 s splice into opencv-doc's
// box.mp4 at 512 px, 2026-12-05: cut 0.357 at the splice, 0.007-0.018
// around it).
#include <gtest/gtest.h>

#include <cmath>
#include <vector>

#include "analyzer/metrics/jump_cut.h"
#include "clipwarden/report.h"

using namespace clipwarden;

TEST(JumpCut, ASpliceStandsOutOfTheFramesAroundIt) {
  std::vector<double> cut(20, 0.012);
  cut[0] = kUndefined;  // frame 0 has no pair
  cut[9] = 0.018;
  cut[11] = 0.015;
  cut[10] = 0.357;
  const std::vector<double> jump = jump_cut_series(cut);
  EXPECT_TRUE(std::isnan(jump[0]));
  // Around pair 10: 0.012 x 8 and 0.018, 0.015: the second largest is
  // 0.015, so 0.357 / 0.015 = 23.8.
  EXPECT_NEAR(jump[10], 0.357 / 0.015, 1e-9);
  for (int i = 1; i < 20; ++i)
    if (i != 10) EXPECT_EQ(jump[i], 0) << i;  // below 0.15: not a jump
}

TEST(JumpCut, AFrameSplicedInJumpsTwiceAndBothStandOut) {
  // Away at pair 8 and back at pair 9: each is the other's largest
  // neighbour, so the second largest (0.02) is the reference.
  std::vector<double> cut(17, 0.02);
  cut[8] = 0.3;
  cut[9] = 0.32;
  const std::vector<double> jump = jump_cut_series(cut);
  EXPECT_NEAR(jump[8], 0.3 / 0.02, 1e-9);
  EXPECT_NEAR(jump[9], 0.32 / 0.02, 1e-9);
}

TEST(JumpCut, SceneCutsAndBusyStretchesAreNotJumps) {
  std::vector<double> cut(30, 0.2);  // fast motion: every pair reads 0.2
  cut[5] = 0.3;
  cut[20] = 0.7;  // a cut to another scene: `cut`'s own, at 0.4 and above
  const std::vector<double> jump = jump_cut_series(cut);
  EXPECT_NEAR(jump[5], 0.3 / 0.2, 1e-9);
  EXPECT_EQ(jump[20], 0);
  // A still scene's noise (0.001) is floored at 0.01, so a reading of 0.16
  // counts 16 times, not 160.
  std::vector<double> still(11, 0.001);
  still[5] = 0.16;
  EXPECT_NEAR(jump_cut_series(still)[5], 16, 1e-9);
}
