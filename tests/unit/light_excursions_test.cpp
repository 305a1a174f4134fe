// Lone and repeated departures of a flicker series (analyzer/metrics/
// light_excursions.h), on hand-worked series at 10 fps. The outside anchor
// is the injected flicker of docs/inject.md: a square wave at 4 Hz, which
// at 10 fps departs up and down every frame or two; the natural changes are
// the shapes the corpus's camera clips show (docs/accuracy.md): one step
// up and back, one dip.
#include <gtest/gtest.h>

#include <cmath>
#include <vector>

#include "analyzer/metrics/light_excursions.h"

using namespace clipwarden;

namespace {

std::vector<double> times(size_t n, double fps = 10) {
  std::vector<double> t(n);
  for (size_t i = 0; i < n; ++i) t[i] = static_cast<double>(i) / fps;
  return t;
}

constexpr ExcursionRule kRule{.min_level = 0.02, .comparable_share = 0.5, .within_s = 1.0};

TEST(LightExcursions, OneStepUpAndBackIsLone) {
  std::vector<double> v(40, 0.0);
  for (int t = 20; t <= 22; ++t) v[t] = 0.07;  // 0.3 s up, as a camera's exposure step
  v[23] = 0.01;                                // under min_level: not a departure
  const auto lone = lone_excursion_frames(v, times(v.size()), kRule);
  for (size_t t = 0; t < v.size(); ++t) EXPECT_EQ(lone[t], t >= 20 && t <= 22) << t;
}

TEST(LightExcursions, SquareWaveAtFourHertzIsRepeated) {
  // 4 Hz sampled at 10 fps: + + - - + + - ... (period 2.5 frames).
  std::vector<double> v(40, 0.0);
  for (int t = 10; t < 20; ++t) v[t] = std::sin(2 * M_PI * 4 * (t / 10.0) + 0.3) > 0 ? 0.08 : -0.08;
  const auto lone = lone_excursion_frames(v, times(v.size()), kRule);
  for (int t = 10; t < 20; ++t) EXPECT_FALSE(lone[t]) << t;
}

TEST(LightExcursions, AReboundUnderHalfAndAStepFarAwayDoNotRepeat) {
  std::vector<double> v(60, 0.0);
  v[10] = v[11] = -0.10;  // a dip ...
  v[14] = 0.04;           // ... with a rebound under half its depth
  v[40] = v[41] = 0.10;   // a comparable step 2.8 s later: too far to repeat it
  const auto lone = lone_excursion_frames(v, times(v.size()), kRule);
  EXPECT_TRUE(lone[10] && lone[11] && lone[40] && lone[41]);
  EXPECT_TRUE(lone[14]);  // the dip is more than twice the rebound: not comparable
}

TEST(LightExcursions, TwoStepsWithinASecondRepeatEachOther) {
  std::vector<double> v(40, std::nan(""));
  for (size_t t = 0; t < v.size(); ++t) v[t] = 0;
  v[10] = 0.06;
  v[19] = 0.05;  // 0.9 s after: repeats
  v[5] = std::nan("");
  const auto lone = lone_excursion_frames(v, times(v.size()), kRule);
  EXPECT_FALSE(lone[10]);
  EXPECT_FALSE(lone[19]);
}

}  // namespace
