// Drift on clean real footage through the whole analysis (analyze_clip):
// opencv-doc's vtest.avi (a static camera over a plaza where people walk,
// cross and pass behind a sign post; first 150 frames, trimmed with the
// ffmpeg CLI), tree.avi (68 frames, irregular timestamps), box.mp4 (a
// hand carries a printed tea box away from a hand-held camera and back) and
// cup.mp4 (a glossy tumbler turned in the hand over faint pen marks).
// Nothing in them drifts, so no object and no frame may reach the review
// level (drift 1.0, docs/drift.md); the walking people must be followed as
// objects; the report must satisfy the report schema (report/schema).
#include <gtest/gtest.h>

#include <unistd.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>

#include "analyzer/core/assets.h"
#include "clipwarden/analysis.h"
#include "clipwarden/report_io.h"
#include "report/json/schema_check.h"
#include "support/clips.h"
#include "support/corpus.h"
#include "support/drift_pairs.h"
#include "support/opencv_doc.h"

namespace clipwarden::test {
namespace {

constexpr double kReview = 1.0;

void expect_no_review_drift(const Report& report) {
  const MetricSeries* drift = report.find_series("drift");
  ASSERT_NE(drift, nullptr);
  double worst = 0;
  for (double v : drift->values) {
    if (is_defined(v)) worst = std::max(worst, v);
  }
  EXPECT_LT(worst, kReview) << "largest per-frame drift";
  for (const auto& o : report.objects) {
    if (std::isfinite(o.peak_drift)) EXPECT_LT(o.peak_drift, kReview) << "object " << o.id;
    for (const auto& s : o.drift_segments) EXPECT_LT(s.peak, kReview) << "object " << o.id;
  }
  const auto schema = nlohmann::json::parse(asset("clipwarden.report-1.schema.json"));
  const Status valid = check_against_schema(report_to_json(report), schema, "report");
  EXPECT_TRUE(valid.ok()) << (valid.ok() ? "" : valid.error().message());
}

TEST(DriftFootage, VtestFirst150FramesReadsNoDrift) {
  const std::string vtest = opencv_sample("vtest.avi");
  if (vtest.empty()) GTEST_SKIP() << "opencv-doc vtest.avi not installed";
  if (std::system("ffmpeg -version >/dev/null 2>&1") != 0) GTEST_SKIP() << "ffmpeg CLI not installed";
  const auto dir = std::filesystem::temp_directory_path() / ("clipwarden-drift-" + std::to_string(::getpid()));
  std::filesystem::create_directories(dir);
  const std::string trimmed = (dir / "vtest150.avi").string();
  const std::string cmd = "ffmpeg -v error -y -i '" + vtest + "' -frames:v 150 -c copy '" + trimmed + "'";
  ASSERT_EQ(std::system(cmd.c_str()), 0) << cmd;
  auto report = analyze_clip(trimmed, AnalysisSettings{}, default_policy());
  std::filesystem::remove_all(dir);
  ASSERT_TRUE(report.ok()) << report.error().message();
  EXPECT_EQ(report->frame_times_s.size(), 150u);
  int moving = 0;
  for (const auto& o : report->objects) moving += o.kind == TrackedKind::moving;
  EXPECT_GE(moving, 3) << "the people walking at the start are followed";
  expect_no_review_drift(*report);
}

TEST(DriftFootage, TreeReadsNoDrift) {
  const std::string tree = opencv_sample("tree.avi");
  if (tree.empty()) GTEST_SKIP() << "opencv-doc tree.avi not installed";
  auto report = analyze_clip(tree, AnalysisSettings{}, default_policy());
  ASSERT_TRUE(report.ok()) << report.error().message();
  EXPECT_FALSE(report->objects.empty());
  expect_no_review_drift(*report);
}

// box.mp4, 6 s from frame 240 at 320 px: the box is carried away from the
// camera and back toward it, and its tracked points close in and spread
// apart by more than 30% within 2 s (measured 38% on 2026-12-05), the size
// unit of the drift scale. Before size alone was held under the review
// level this read as a drift review (so did box, cup and 13 more camera
// clips of the corpus, docs/accuracy.md); the size change must still be
// measured, and reported under review.
TEST(DriftFootage, BoxCarriedToAndFromTheCameraReadsNoDriftReview) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  const TempDir dir;
  const std::string full = unpacked_opencv_doc_clip(dir.path().string(), "box.mp4");
  if (full.empty()) GTEST_SKIP() << "opencv-doc box.mp4.gz (or gzip) not installed";
  const std::string window = dir.file("box240.mkv");
  // Frame 240 is at 8.008 s (29.97 fps); seeking before the input decodes
  // from the key frame before it and starts exactly there.
  const std::string cut =
      "ffmpeg -v error -y -ss 8.01 -i '" + full + "' -frames:v 180 -an -c:v ffv1 '" + window + "'";
  ASSERT_EQ(std::system(cut.c_str()), 0) << cut;
  AnalysisSettings settings;
  settings.working_long_side = 320;
  auto report = analyze_clip(window, settings, default_policy());
  ASSERT_TRUE(report.ok()) << report.error().message();
  double largest_size_log = 0;
  for (const auto& o : report->objects) {
    for (const auto& look : o.samples) {
      if (!std::isfinite(look.size_window_pct)) continue;
      largest_size_log = std::max(largest_size_log, std::abs(std::log1p(look.size_window_pct / 100)));
    }
  }
  EXPECT_GT(largest_size_log, std::log(1.3)) << "the box's size change within 2 s is measured";
  expect_no_review_drift(*report);
}

// A webcam close-up of a guitar being strummed in a dim room (UCF101
// PlayingGuitar g18, from the evaluation corpus; skipped without it): as
// the hand and guitar move through the lamp's light, followed objects
// darken and brighten by a full CIEDE2000 of 15-23 while their colour with
// their own brightness removed stays under 5 (measured 2026-12-05: 18.4 /
// 1.7 at the sample read, peaks 23.1 / 2.1). That is light and shade, and
// the full colour of a moving object alone is held under the review level
// (docs/drift.md); before 2026-12-05 it read 1.15 and the clip was
// reviewed for drift. The brightness change must still be measured.
TEST(DriftFootage, DimGuitarCloseUpBrightnessIsNotAReview) {
  const std::string guitar = corpus_clip("cam_vgen_ucf101_PlayingGuitar_g18_c01.avi");
  if (guitar.empty()) GTEST_SKIP() << "evaluation corpus not found (set CLIPWARDEN_CORPUS)";
  const Report report = analyse_with_defaults(guitar);
  double largest_brightness_only = 0;
  for (const auto& o : report.objects) {
    for (const auto& s : o.samples) {
      if (!is_defined(s.color_de00) || !is_defined(s.own_color_de00) || s.own_color_de00 >= 5) continue;
      largest_brightness_only = std::max(largest_brightness_only, s.color_de00);
    }
  }
  EXPECT_GE(largest_brightness_only, 15) << "the light change on the followed objects is measured";
  expect_no_review_drift(report);
}

// Hand-held opencv-doc cup.mp4 (a glossy tumbler turned in the hand over a
// table with faint pen marks): as the tumbler's dark base comes down over
// the marks, the followed marks' windows gain 2.7 times their reference
// gradient energy, which read as structure 0.76 and a drift review. The
// structure aspect counts texture lost or rearranged, not energy gained
// (docs/drift.md, "Structure"); measured 2026-12-05: the marks' orientation
// mix alone reads 0.42, peak drift 0.85. Structure must still be read
// (rearranged orientations on the cup's own objects, 0.42-0.44 measured;
// the floor of 0.3 sits a quarter below it).
TEST(DriftFootage, HandHeldCupReadsNoDriftReview) {
  const TempDir dir;
  const std::string cup = unpacked_opencv_doc_clip(dir.path().string(), "cup.mp4");
  if (cup.empty()) GTEST_SKIP() << "opencv-doc cup.mp4.gz (or gzip) not installed";
  const Report report = analyse_with_defaults(cup);
  double largest_structure = 0;
  for (const auto& o : report.objects) {
    for (const auto& s : o.samples) {
      if (is_defined(s.structure)) largest_structure = std::max(largest_structure, s.structure);
    }
  }
  EXPECT_GE(largest_structure, 0.3) << "structure is still measured on the followed objects";
  expect_no_review_drift(report);
}

}  // namespace
}  // namespace clipwarden::test
