// The appearance metric on real footage from the evaluation corpus
// (CLIPWARDEN_CORPUS; skipped without it): two model outputs in which a
// thing appears where nothing moved (seen by eye, noted in the corpus
// manifest) and camera clips of natural change that must stay quiet.
// Values measured 2026-12-05 (docs/accuracy.md, "Local appearances that
// stay").
#include <gtest/gtest.h>

#include <algorithm>
#include <string>
#include <utility>

#include "clipwarden/report.h"
#include "support/corpus.h"

namespace clipwarden::test {
namespace {

double highest(const Report& r, const std::string& column) {
  const MetricSeries* s = r.find_series(column);
  double best = 0;
  if (s)
    for (double v : s->values)
      if (is_defined(v)) best = std::max(best, v);
  return best;
}

// AnimateDiff model03: a dark vertical pole appears at the left edge of a
// seascape behind a portrait for half a second (GIF frames 12-18, pictures
// 4-7 of 16); measured 5.70 at picture 5 (the pole over bright waves).
// model07: a rainbow glow arc materialises behind the head in the last four
// pictures; measured 3.39 at picture 13, top right. Floors: model03 20%
// below; model07 at the review level itself (its margin is 13%, stated).
TEST(AppearanceFootage, ThingsThatAppearWhereNothingMovedAreReviewed) {
  for (const auto& [file, floor, first, last] :
       {std::tuple{"gen_animatediff_model03_01.gif", 4.5, 3, 8},
        std::tuple{"gen_animatediff_model07_01.gif", 3.0, 11, 15}}) {
    const std::string clip = corpus_clip(file);
    if (clip.empty()) GTEST_SKIP() << "evaluation corpus not found (set CLIPWARDEN_CORPUS)";
    const Report r = analyse_with_defaults(clip);
    EXPECT_GE(highest(r, "appearance"), floor) << file;
    bool reviewed_in_place = false;
    for (const Segment& s : r.segments)
      if (s.metric == "appearance" && s.severity == Severity::review && s.end_frame >= first &&
          s.start_frame <= last)
        reviewed_in_place = true;
    EXPECT_TRUE(reviewed_in_place) << file << ": " << flagged_segments(r, "appearance");
  }
}

// Camera clips where regions change and stay changed naturally: vtest's
// pedestrians who stop and go, a person in a short 8 fps clip (the camera
// cell with the largest change where nothing moved, 82 levels), a class
// whose pupils move in their seats, a wall of fire. None may be flagged.
TEST(AppearanceFootage, NaturalChangeOnCameraClipsIsNotFlagged) {
  for (const char* file : {"cam_debian-opencv-doc_vtest_first15s.avi", "cam_depthanything_videoedit_demo2_input.mp4",
                           "cam_isv_classroom_preview.gif", "cam_haulth_fire_wall.mp4"}) {
    const std::string clip = corpus_clip(file);
    if (clip.empty()) GTEST_SKIP() << "evaluation corpus not found (set CLIPWARDEN_CORPUS)";
    const Report r = analyse_with_defaults(clip);
    EXPECT_EQ(flagged_segments(r, "appearance"), "") << file;
  }
}

}  // namespace
}  // namespace clipwarden::test
