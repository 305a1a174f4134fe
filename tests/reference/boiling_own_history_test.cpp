// boiling judged against each window's own history (analyzer/metrics/
// boiling_metric.cpp, "Natural re-drawing"), on real clips from the
// evaluation corpus (CLIPWARDEN_CORPUS; skipped without it): a one-second
// boiling injected into a short model output is found although it is a
// quarter of the clip, and a hand-held camera clip at 2 fps whose windows
// swing from frame to frame is not reviewed.
#include <gtest/gtest.h>

#include <cstdio>
#include <cstdlib>

#include "support/accuracy_run.h"
#include "support/clips.h"
#include "support/corpus.h"
#include "support/corpus_run.h"

namespace clipwarden::test {
namespace {

// Stable Video Diffusion's output 000002 (25 frames at 8 fps, a dog
// swimming), cut and scaled by the accuracy evaluation (320 px) and
// injected with moderate boiling (fresh smooth noise of 8-bit sd 10) at
// frames 7-12, as `clipwarden_accuracy_eval --bases gen_svd --classes
// boiling` does. Measured 2026-12-05 (docs/accuracy.md, "Boiling against
// each window's own history"): the series reads 0.0019-0.0024 over the
// defect, while the clip baseline of the segment rule (median + 6
// MAD-sigmas of the 23 measured frames) stood at 0.0033 and kept it out;
// judged against each window's history it is a boiling segment.
TEST(BoilingOwnHistory, ABoilingQuarterOfAShortModelOutputIsFound) {
  const char* env = std::getenv("CLIPWARDEN_CORPUS");
  const auto corpus_dir = corpus::find_corpus(env ? env : "");
  if (!env || !corpus_dir) GTEST_SKIP() << "set CLIPWARDEN_CORPUS to the evaluation corpus (clips/ and MANIFEST.tsv)";
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  const TempDir work;
  accuracy::EvalOptions options;
  options.set.work_dir = work.path().string();
  options.set.long_side = 320;
  options.set.max_frames = 80;
  options.set.base_names = {"gen_svd"};
  options.set.corpus_dir = *corpus_dir;
  options.classes = {inject::DefectClass::boiling};
  auto run = accuracy::run_evaluation(options);
  ASSERT_TRUE(run.ok()) << run.error().message();
  ASSERT_EQ(run->cases.size(), 1u);
  const accuracy::Scoreboard board = accuracy::score_all(run->cases, run->clean, options.policy);
  const accuracy::ClassLevelRow* row =
      board.find(inject::DefectClass::boiling, inject::StrengthLevel::moderate, "generated");
  ASSERT_NE(row, nullptr);
  EXPECT_EQ(row->detected, 1) << board.markdown();
  EXPECT_EQ(row->flagged, 1) << "reviewed for the boiling";
  ASSERT_EQ(run->clean.size(), 1u);
  ASSERT_TRUE(run->clean.front().report.has_value()) << run->clean.front().error;
  EXPECT_EQ(flagged_segments(*run->clean.front().report, "boiling"), "") << "the untouched output";
}

// opencv-doc's tree.avi (hand-held, about 2 fps, 35 frames in the corpus):
// its windows swing with the rough flow of a slow frame rate. Without the
// clip baseline and without the windows' own spread it was reviewed at
// 0.0021 (frames 5-11); with half the spread taken off it reads 0.0019,
// under the review level (measured 2026-12-05).
TEST(BoilingOwnHistory, AHandHeldTreeAtTwoFpsIsNotReviewed) {
  const std::string path = corpus_clip("cam_debian-opencv-doc_tree_first15s.avi");
  if (path.empty()) GTEST_SKIP() << "evaluation corpus not found (set CLIPWARDEN_CORPUS)";
  EXPECT_EQ(flagged_segments(analyse_with_defaults(path), "boiling"), "");
}

}  // namespace
}  // namespace clipwarden::test
