// Drift's structure aspect (analyzer/drift/frame_features.h): the generalised
// Hellinger distance sqrt(1/2 sum (sqrt(p_i) - sqrt(q_i))^2) between the
// reference and current orientation measures, both divided by the reference
// mass. Expected values are worked by hand from that formula: for the same
// orientation mix holding k times the reference energy, every bin differs by
// (1 - sqrt(k)) sqrt(p_i), so the distance is |1 - sqrt(k)| / sqrt(2); for
// disjoint mixes of equal mass it is sqrt(1/2 (1 + 1)) = 1.
#include <gtest/gtest.h>

#include <cmath>

#include "analyzer/drift/frame_features.h"

namespace clipwarden::drift {
namespace {

OrientationHistogram mix(float scale) {
  OrientationHistogram h{};
  h[0] = 5 * scale, h[1] = 3 * scale, h[6] = 2 * scale;  // mass 10 * scale
  return h;
}

float mass(const OrientationHistogram& h) {
  float m = 0;
  for (const float bin : h) m += bin;
  return m;
}

TEST(DriftStructure, EnergyGainedWithTheSameMixIsNoDeparture) {
  const OrientationHistogram ref = mix(1), brighter_edges = mix(2.8f);
  // The plain distance counts the gain: |1 - sqrt(2.8)| / sqrt(2) = 0.4760.
  EXPECT_NEAR(histogram_distance(ref.data(), brighter_edges.data(), mass(ref), 1), 0.4760, 1e-3);
  EXPECT_NEAR(structure_departure(ref, brighter_edges, mass(ref), 1), 0.0, 1e-6);
}

TEST(DriftStructure, EnergyLostStillCounts) {
  // Blur or flattening: a quarter of the energy, |1 - sqrt(0.25)| / sqrt(2).
  const OrientationHistogram ref = mix(1), flattened = mix(0.25f);
  EXPECT_NEAR(structure_departure(ref, flattened, mass(ref), 1), 0.5 / std::sqrt(2.0), 1e-5);
}

TEST(DriftStructure, AnotherOrientationMixCountsWhateverItsEnergy) {
  OrientationHistogram ref{}, turned{};
  ref[0] = 10;
  turned[3] = 28;  // disjoint bins, 2.8 times the energy
  EXPECT_NEAR(structure_departure(ref, turned, mass(ref), 1), 1.0, 1e-5);
  turned[3] = 10;  // and at the same energy
  EXPECT_NEAR(structure_departure(ref, turned, mass(ref), 1), 1.0, 1e-5);
}

TEST(DriftStructure, GlobalContrastGainIsTakenOutAsBefore) {
  // The whole frame's contrast doubled (illumination fit): twice the energy
  // is expected, half of it is a loss, |1 - sqrt(0.5)| / sqrt(2).
  const OrientationHistogram ref = mix(1), same = mix(2), flatter = mix(1);
  EXPECT_NEAR(structure_departure(ref, same, mass(ref), 2), 0.0, 1e-6);
  EXPECT_NEAR(structure_departure(ref, flatter, mass(ref), 2), (1 - std::sqrt(0.5)) / std::sqrt(2.0),
              1e-5);
}

TEST(DriftStructure, EmptyReferenceReadsNothing) {
  const OrientationHistogram ref{}, cur = mix(1);
  EXPECT_EQ(structure_departure(ref, cur, 0, 1), 0.0f);
}

}  // namespace
}  // namespace clipwarden::drift
