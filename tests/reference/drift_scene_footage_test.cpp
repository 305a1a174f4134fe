// Drift on the evaluation corpus (skipped without it, tests/support/corpus.h):
// a departure spread over the scene's moving objects at once is held under
// review (analyzer/drift/scene_departure.h), while one object departing
// alone in a model output stays a review.
#include <gtest/gtest.h>

#include <algorithm>
#include <string>

#include "support/corpus.h"

namespace clipwarden::test {
namespace {

constexpr double kReview = 1.0;

double largest_drift(const Report& report) {
  double worst = 0;
  if (const MetricSeries* drift = report.find_series("drift")) {
    for (const double v : drift->values) {
      if (is_defined(v)) worst = std::max(worst, v);
    }
  }
  for (const auto& o : report.objects) {
    for (const auto& s : o.drift_segments) worst = std::max(worst, s.peak);
  }
  return worst;
}

// Moving objects whose own colour change (brightness removed) reaches `de00`.
int objects_departing(const Report& report, double de00) {
  int count = 0;
  for (const auto& o : report.objects) {
    if (o.kind != TrackedKind::moving) continue;
    count += std::any_of(o.samples.begin(), o.samples.end(), [&](const TrackedSample& s) {
      return is_defined(s.own_color_de00) && s.own_color_de00 >= de00;
    });
  }
  return count;
}

// A wall of flames filmed on black (cam_haulth_fire_wall.mp4, 10 s at
// 25 fps): the followed flame tongues rise and cool from yellow to red, 8
// moving objects reaching an own ΔE00 of 11-35 (measured 2026-12-05; main
// before this rule reviewed the clip for drift at 3.45). Beside each of
// those readings 39-96% of the other objects' readings within a second had
// departed too, over 16-90% of the frame: none is one object's drift. The change must still be
// measured (floor: 6 objects from ΔE00 10, against 8 measured) and held
// under review.
TEST(DriftSceneFootage, WallOfFlamesIsTheScenesChangeNotAnObjectsDrift) {
  const std::string fire = corpus_clip("cam_haulth_fire_wall.mp4");
  if (fire.empty()) GTEST_SKIP() << "evaluation corpus not found (set CLIPWARDEN_CORPUS)";
  const Report report = analyse_with_defaults(fire);
  EXPECT_GE(objects_departing(report, 10), 6) << "the flames' own colour change is measured";
  EXPECT_LT(largest_drift(report), kReview) << flagged_segments(report, "drift");
}

// Model outputs whose defect a viewer sees and drift names (the corpus
// manifest's notes): AnimateDiff model05's guitar body flips between red
// and sunburst (drift 1.35 measured 2026-12-05, the guitar's own ΔE00
// 13.5, 21% of the other objects' readings departed beside it) and
// model01's loose hair gathers into a bun (1.28; 8%). They must stay at
// review.
TEST(DriftSceneFootage, OneObjectRecolouredInAModelOutputStaysAReview) {
  for (const char* file : {"gen_animatediff_model05_01.gif", "gen_animatediff_model01_01.gif"}) {
    const std::string clip = corpus_clip(file);
    if (clip.empty()) GTEST_SKIP() << "evaluation corpus not found (set CLIPWARDEN_CORPUS)";
    const Report report = analyse_with_defaults(clip);
    EXPECT_GE(largest_drift(report), kReview) << file;
  }
}

}  // namespace
}  // namespace clipwarden::test
