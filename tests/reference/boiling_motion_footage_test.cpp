// boiling beside a window's own motion (analyzer/metrics/boiling_metric.cpp,
// "Motion"), on real footage from the evaluation corpus (CLIPWARDEN_CORPUS;
// skipped without it). Camera clips whose fast movers are smeared by the
// shutter were reviewed for boiling; a model output whose body is re-drawn
// every frame must stay reviewed.
#include <gtest/gtest.h>

#include <string>

#include "support/corpus.h"

namespace clipwarden::test {
namespace {

const Segment* strongest_boiling(const Report& r) {
  const Segment* best = nullptr;
  for (const Segment& s : r.segments)
    if (s.metric == "boiling" && (!best || s.peak > best->peak)) best = &s;
  return best;
}

// Measured 2026-12-05 before the smear allowance (docs/accuracy.md,
// "Boiling beside the window's motion"), each a boiling review: Chaplin's
// runner entering blurred (0.0099, frames 2-12; its windows move 9-27
// px/frame), a kitten rolling with blurred paws on a patterned blanket
// (0.0020, frames 112-119; 6-12 px/frame), the car turn's pan past grass
// (0.0024, frames 24-31; 11-21 px/frame). Looked at by eye: motion blur,
// nothing re-drawn.
TEST(BoilingMotionFootage, FastMoversSmearedByTheShutterAreNotBoiling) {
  for (const std::string name : {"cam_moviepy_chaplin.mp4", "cam_trackanything_test-sample2.mp4",
                                 "cam_vgen_car_turn.mp4"}) {
    const std::string path = corpus_clip(name);
    if (path.empty()) GTEST_SKIP() << "evaluation corpus not found (set CLIPWARDEN_CORPUS)";
    EXPECT_EQ(flagged_segments(analyse_with_defaults(path), "boiling"), "") << name;
  }
}

// Text2Video-Zero's walking cat (3 fps, 8 frames): its manifest notes a
// body that morphs between frames (elongated, doubled ears), seen by eye.
// Its windows move 9-15 px/frame. Counted as a full smear, that motion took
// frames 5-7 under the entry level and the segment under its 4 frames
// (measured 2026-12-05); a frame of 1/3 s smears only its first 1/8 s, and
// the clip reads 0.029 at frames 2-7 (0.030 before), far above the review
// level 0.002.
TEST(BoilingMotionFootage, AModelOutputsReDrawnBodyStaysReviewed) {
  const std::string path = corpus_clip("gen_t2vzero_cat_walking.gif");
  if (path.empty()) GTEST_SKIP() << "evaluation corpus not found (set CLIPWARDEN_CORPUS)";
  const Report r = analyse_with_defaults(path);
  const Segment* s = strongest_boiling(r);
  ASSERT_NE(s, nullptr) << "no boiling segment";
  EXPECT_NE(s->severity, Severity::info) << "peak " << s->peak;
  EXPECT_GT(s->peak, 0.01);
}

}  // namespace
}  // namespace clipwarden::test
