// boiling on sun glints (analyzer/metrics/boiling_metric.cpp, "Sparkle"),
// on real footage from the evaluation corpus (CLIPWARDEN_CORPUS; skipped
// without it). Outside anchor, seen by eye and described in the corpus
// manifest: hand-held footage of a net cleaning a swimming pool, sun glints
// sparkling on the water and caustics on the floor; nothing in it is
// re-drawn but the light on the water.
#include <gtest/gtest.h>

#include <string>

#include "support/corpus.h"

namespace clipwarden::test {
namespace {

// Before residuals were clipped (measured 2026-12-05, docs/accuracy.md,
// "Sun glints are not boiling"): boiling reviews at frames 54-57 (0.0022),
// 61-64 (0.0034) and 72-78 (0.0029), windows at the edge of the field of
// glints; after: one info segment (frames 73-78, 0.0015).
TEST(BoilingGlintsFootage, SunGlintsOnAPoolAreNotBoiling) {
  const std::string path = corpus_clip("cam_mmaction2_test.mp4");
  if (path.empty()) GTEST_SKIP() << "evaluation corpus not found (set CLIPWARDEN_CORPUS)";
  EXPECT_EQ(flagged_segments(analyse_with_defaults(path), "boiling"), "");
}

}  // namespace
}  // namespace clipwarden::test
