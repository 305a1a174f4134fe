// The short accuracy run (ctest label `accuracy`): every defect class at
// moderate strength, injected into short, small windows of real footage
// from Debian's opencv-doc package (vtest.avi, Megamind.avi, box.mp4),
// analysed with the default policy and scored against the truth; with
// CLIPWARDEN_CORPUS set, the same on six model outputs of the corpus. The full evaluation (all strengths, more footage,
// 512 px) is tests/bench/accuracy_eval.cpp; docs/accuracy.md has both
// commands and the measured table.
//
// The floors below are regression guards set just under what this run
// measured (the full evaluation's table is in docs/accuracy.md), not the
// targets: a class that falls short of the 0.9 target is held to what it
// reaches today, so a change that makes it worse fails here.
#include <gtest/gtest.h>

#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <map>

#include "support/accuracy_run.h"
#include "support/clips.h"
#include "support/corpus_run.h"

using namespace clipwarden;
using namespace clipwarden::accuracy;
using inject::DefectClass;
using inject::StrengthLevel;

namespace {

struct Floor {
  double recall = 0;
  double precision = 0;
  int max_median_onset = 2;  // frames
};

// Per class, at moderate strength, on the short set (three cases a class):
// what the run measured on 2026-12-02 less one case (cut and jerk: 3 of 3
// on 2026-12-04, once jolt and warp_error_ratio judged them), so a
// detector that loses a case it found fails here without the test being
// flaky about threads (boiling: 3 of 3 since 2026-12-04, floor 0.66 since
// 2026-12-05). Drift classes ramp slowly: their onset is counted
// from the frame where the change becomes visible and still lags
// (measured medians 15-22).
const std::map<DefectClass, Floor>& floors() {
  static const std::map<DefectClass, Floor> table = {
      {DefectClass::flicker, {0.66, 0.66, 2}},      {DefectClass::local_flicker, {0.66, 0.66, 2}},
      {DefectClass::boiling, {0.66, 0.66, 2}},      {DefectClass::colour_drift, {0.33, 0.33, 30}},
      {DefectClass::shape_drift, {0.33, 0.33, 30}}, {DefectClass::vanish, {0.33, 0.33, 30}},
      {DefectClass::freeze, {0.66, 0.66, 2}},       {DefectClass::drop, {0.66, 0.66, 2}},
      {DefectClass::cut, {0.66, 0.33, 2}},          {DefectClass::jerk, {0.66, 0.66, 2}},
      {DefectClass::strobe, {0.66, 0.66, 2}},
  };
  return table;
}

// The short run's settings: 320 px, 80 frames, moderate strength.
EvalOptions short_options(const test::TempDir& work, std::vector<std::string> bases) {
  EvalOptions options;
  options.set.work_dir = work.path().string();
  options.set.long_side = 320;
  options.set.max_frames = 80;
  options.set.base_names = std::move(bases);
  options.set.log = [](const std::string& line) { std::fprintf(stderr, "%s\n", line.c_str()); };
  options.levels = {StrengthLevel::moderate};
  return options;
}

// Every analysed case has a report and every class row meets its floor.
void expect_floors(const EvalRun& run, const Scoreboard& board, const std::map<DefectClass, Floor>& table) {
  for (const auto& c : run.cases) EXPECT_TRUE(c.report.has_value()) << c.id << ": " << c.error;
  for (const auto& row : board.rows) {
    const std::string name = inject::to_string(row.cls);
    if (!row.available) {
      std::printf("%s: detector not available\n", name.c_str());
      continue;
    }
    const auto floor = table.find(row.cls);
    if (floor == table.end()) {
      std::printf("%s: measured, no floor set yet (recall %.2f)\n", name.c_str(), row.recall);
      continue;
    }
    EXPECT_GE(row.recall, floor->second.recall) << name << " on " << row.kind << " bases";
    if (row.precision) EXPECT_GE(*row.precision, floor->second.precision) << name << " on " << row.kind << " bases";
    if (row.median_abs_onset)
      EXPECT_LE(*row.median_abs_onset, floor->second.max_median_onset) << name << " on " << row.kind << " bases";
  }
}

}  // namespace

TEST(Accuracy, ModerateDefectsOnShortRealClips) {
  CLIPWARDEN_SKIP_WITHOUT_DATA(vtest, "vtest.avi");
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  const test::TempDir work;
  const EvalOptions options = short_options(work, {"vtest", "megamind", "box"});
  auto run = run_evaluation(options);
  ASSERT_TRUE(run.ok()) << run.error().message();
  ASSERT_GE(run->bases.size(), 2u);

  const Scoreboard board = score_all(run->cases, run->clean, options.policy);
  std::printf("%s\n%zu injected clips, %zu clean, %.0f s\n", board.markdown().c_str(), run->cases.size(),
              run->clean.size(), run->seconds);

  EXPECT_EQ(board.real_rejects, 0) << "an untouched real clip was rejected";
  expect_floors(*run, board, floors());
}

// Per class, at moderate strength, on the six model outputs of the corpus
// (six cases a class; no cut case: every one is too short for a splice 4 s
// away). Measured 2026-12-05 with this test (docs/accuracy.md, "Generated
// bases, per-kind rows and operating points"): flicker 0.83, local flicker
// 0.67, boiling 0.50, colour drift 0.83, shape drift 1.00, vanish 0.83,
// freeze 1.00, drop 1.00, jerk 0.83, strobe 0.67; precision 1.00. Floors
// are those less one case (1/6). Onset medians measured 0-1 frames for the
// sudden classes (limit 2, as on camera footage) and 11-13 for the drift
// ramps (limit 30, as on camera footage). Local flicker 0.50 since
// 2026-12-05, "Light that a gain cannot explain": the pulse injected on a
// generated seascape's moving waves is no longer found, as caustics are not.
// Boiling 0.83 since 2026-12-05, "Boiling against each window's own
// history" (5 of 6; the walking cat's fast scene is still missed, and
// EasyAnimate's case counts its own embers' boiling over the defect).
namespace {
const std::map<DefectClass, Floor>& generated_floors() {
  static const std::map<DefectClass, Floor> table = {
      {DefectClass::flicker, {0.66, 0.66, 2}},      {DefectClass::local_flicker, {0.33, 0.66, 2}},
      {DefectClass::boiling, {0.66, 0.66, 2}},      {DefectClass::colour_drift, {0.66, 0.66, 30}},
      {DefectClass::shape_drift, {0.83, 0.66, 30}}, {DefectClass::vanish, {0.66, 0.66, 30}},
      {DefectClass::freeze, {0.83, 0.66, 2}},       {DefectClass::drop, {0.83, 0.66, 2}},
      {DefectClass::jerk, {0.66, 0.66, 2}},         {DefectClass::strobe, {0.5, 0.66, 2}},
  };
  return table;
}
}  // namespace

TEST(Accuracy, ModerateDefectsOnGeneratedClips) {
  const char* env = std::getenv("CLIPWARDEN_CORPUS");
  const auto corpus_dir = corpus::find_corpus(env ? env : "");
  if (!env || !corpus_dir) GTEST_SKIP() << "set CLIPWARDEN_CORPUS to the evaluation corpus (clips/ and MANIFEST.tsv)";
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  const test::TempDir work;
  EvalOptions options = short_options(work, {"generated"});
  options.set.corpus_dir = *corpus_dir;
  auto run = run_evaluation(options);
  ASSERT_TRUE(run.ok()) << run.error().message();
  ASSERT_EQ(run->bases.size(), 6u);

  const Scoreboard board = score_all(run->cases, run->clean, options.policy);
  std::printf("%s\n%zu injected clips, %.0f s\n", board.markdown().c_str(), run->cases.size(), run->seconds);
  for (const auto& row : board.rows) EXPECT_EQ(row.kind, "generated") << inject::to_string(row.cls);
  expect_floors(*run, board, generated_floors());
}

// One local-flicker case at the default working size, 512 px: moderate
// local flicker (gain 0.25 at 4 Hz, clipwarden inject) injected beside a
// talking face in opencv-doc Megamind.avi, the case the full 512 px run of
// 2026-12-05 traced its loss to (docs/accuracy.md, "Local flicker judged on
// a flow the pulse does not move"): at 512 px the pulse moved the flow,
// the block gates called the region a mover and flicker_local read 0 on
// every frame, while the 320 px run above still found it. Measured with
// this case on 2026-12-05: a reject segment over the truth, peak 0.71
// inside its frames. The floor asks for a segment at review or above
// (the review level is 0.18, a quarter of what was measured) overlapping
// the truth, scored as the full evaluation scores it. One case (two
// analyses of 80 frames: the injected clip and the clean base, which must
// not be rejected), not a sweep: CI's time is short.
TEST(Accuracy, LocalFlickerBesideATalkingFaceAt512Px) {
  CLIPWARDEN_SKIP_WITHOUT_DATA(megamind, "Megamind.avi");
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  const test::TempDir work;
  EvalOptions options = short_options(work, {"megamind"});
  options.set.long_side = 512;
  options.classes = {DefectClass::local_flicker};
  auto run = run_evaluation(options);
  ASSERT_TRUE(run.ok()) << run.error().message();
  ASSERT_EQ(run->cases.size(), 1u);
  const AnalyzedCase& c = run->cases[0];
  ASSERT_TRUE(c.report.has_value()) << c.id << ": " << c.error;

  const Scoreboard board = score_all(run->cases, run->clean, options.policy);
  std::printf("%s\n", board.markdown().c_str());
  EXPECT_EQ(board.real_rejects, 0) << "the untouched Megamind window was rejected";
  const FrameSpan span = expected_span(c.cls, c.truth_defect, *c.report);
  bool flagged = false;
  for (const Segment& s : segments_under(*c.report, options.policy))
    if (s.metric == "flicker_local" && s.severity != Severity::info &&
        s.start_frame <= span.end + kMatchToleranceFrames && s.end_frame >= span.start - kMatchToleranceFrames)
      flagged = true;
  EXPECT_TRUE(flagged) << "no flicker_local segment at review or above over frames " << span.start << "-"
                       << span.end;
}
