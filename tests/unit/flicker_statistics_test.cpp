// Flicker statistics against the IES Lighting Handbook definitions of
// percent flicker and flicker index, through their closed forms for a
// sinusoidal and a square-wave modulation (derived in
// analyzer/metrics/flicker_statistics.h).
#include <gtest/gtest.h>

#include <cmath>
#include <numbers>
#include <random>
#include <vector>

#include "analyzer/metrics/flicker_statistics.h"

using namespace clipwarden;

namespace {

constexpr double kPi = std::numbers::pi;

struct Series {
  std::vector<double> t, v;
};

// L(t) = L0 (1 + m sin(2 pi f t + phase)) sampled at fps for `seconds`.
Series sinusoid(double l0, double m, double f_hz, double fps, double seconds, double phase = 0) {
  Series s;
  for (int i = 0; i < static_cast<int>(std::lround(fps * seconds)); ++i) {
    s.t.push_back(i / fps);
    s.v.push_back(l0 * (1 + m * std::sin(2 * kPi * f_hz * s.t.back() + phase)));
  }
  return s;
}

}  // namespace

TEST(FlickerStatistics, SinusoidClosedFormsDenselySampled) {
  // 3 Hz over exactly 3 s at 1200 samples/s: whole cycles, peaks sampled.
  for (double m : {0.05, 0.2, 0.7}) {
    const Series s = sinusoid(0.3, m, 3, 1200, 3);
    EXPECT_NEAR(percent_flicker(s.v), 100 * m, 1e-9) << m;  // 100 m
    EXPECT_NEAR(flicker_index(s.v), m / kPi, 1e-4) << m;    // m / pi
  }
}

TEST(FlickerStatistics, SinusoidAtVideoFrameRates) {
  // At 30 fps a 3 Hz cycle has 10 samples; with the peaks on samples
  // (cosine phase) percent flicker is exact and the rectangle-rule flicker
  // index is (1 + 2 cos 36deg + 2 cos 72deg) m / 10 = 0.3236 m (vs m/pi =
  // 0.3183 m), within 2%.
  const Series s = sinusoid(0.4, 0.3, 3, 30, 4, kPi / 2);
  EXPECT_NEAR(percent_flicker(s.v), 30, 1e-9);
  EXPECT_NEAR(flicker_index(s.v), 0.3 / kPi, 0.02 * 0.3 / kPi);
}

TEST(FlickerStatistics, SquareWaveFlickerIndexIsPercentOver200) {
  std::vector<double> v;
  for (int i = 0; i < 400; ++i) v.push_back((i / 10) % 2 ? 0.6 : 0.2);
  EXPECT_NEAR(percent_flicker(v), 50, 1e-12);  // 100 (0.6-0.2)/(0.6+0.2)
  EXPECT_NEAR(flicker_index(v), 0.25, 1e-12);  // (b-a) / (2 (a+b))
}

TEST(FlickerStatistics, UndefinedValuesAreSkippedAndDegenerateInputsAreNaN) {
  std::vector<double> v = {NAN, 0.2, 0.6, NAN, 0.2, 0.6};
  EXPECT_NEAR(percent_flicker(v), 50, 1e-12);
  EXPECT_TRUE(std::isnan(percent_flicker(std::vector<double>{})));
  EXPECT_TRUE(std::isnan(percent_flicker(std::vector<double>{0, 0})));
  EXPECT_TRUE(std::isnan(flicker_index(std::vector<double>{NAN})));
  EXPECT_TRUE(std::isnan(dominant_frequency(std::vector<double>{1, 2}, std::vector<double>{0, 1})
                             .frequency_hz));
}

TEST(FlickerStatistics, DominantFrequencyUsesRealTime) {
  // 3 Hz at 30 fps, at 8 fps (below Nyquist 4 Hz) and at 60 fps.
  for (double fps : {8.0, 30.0, 60.0}) {
    const Series s = sinusoid(0.3, 0.1, 3, fps, 10);
    const DominantFrequency d = dominant_frequency(s.v, s.t);
    EXPECT_NEAR(d.frequency_hz, 3.0, 0.02) << fps;
    EXPECT_GT(d.power_share, 0.9) << fps;
  }
}

TEST(FlickerStatistics, DominantFrequencyWithJitteredAndMissingFrames) {
  // Timestamps jittered by up to 20% of a frame interval and every 10th
  // frame dropped: the frequency is still found in real time.
  std::mt19937 rng(7);
  std::uniform_real_distribution<double> jitter(-0.2 / 25, 0.2 / 25);
  std::vector<double> t, v;
  for (int i = 0; i < 250; ++i) {
    if (i % 10 == 9) continue;
    t.push_back(i / 25.0 + jitter(rng));
    v.push_back(0.05 * std::sin(2 * kPi * 2.5 * t.back()));
  }
  EXPECT_NEAR(dominant_frequency(v, t).frequency_hz, 2.5, 0.05);
}

TEST(FlickerStatistics, NoiseHasNoDominantPeak) {
  std::mt19937 rng(3);
  std::normal_distribution<double> noise(0, 0.01);
  std::vector<double> t, v;
  for (int i = 0; i < 300; ++i) t.push_back(i / 30.0), v.push_back(noise(rng));
  EXPECT_LT(dominant_frequency(v, t).power_share, 0.3);
}

TEST(FlickerStatistics, ClipStatisticsIgnoreSlowChange) {
  // A 3 Hz, m = 0.1 flicker on top of a slow fade from 0.2 to 0.4 over 10 s:
  // the fade is removed by the running median, so percent flicker stays near
  // the flicker's own 100 * 0.1 * L0 / level (L0 = level here) = 10, while
  // the raw series would give 100 (0.44 - 0.18) / 0.62 = 42.
  std::vector<double> t, v;
  for (int i = 0; i < 300; ++i) {
    t.push_back(i / 30.0);
    const double base = 0.2 + 0.02 * t.back();
    v.push_back(base + 0.03 * std::sin(2 * kPi * 3 * t.back() + kPi / 2));
  }
  const FlickerStatistics s = flicker_statistics(v, t);
  EXPECT_NEAR(s.percent_flicker, 100 * 0.03 / 0.3, 1.0);
  EXPECT_NEAR(s.flicker_index, 0.1 / kPi, 0.01);
  EXPECT_NEAR(s.dominant.frequency_hz, 3.0, 0.03);
  EXPECT_GT(percent_flicker(v), 35);
}
