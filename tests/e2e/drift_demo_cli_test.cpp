// Object drift on the committed demo clips, through the built CLI
// (`clipwarden analyze`, default policy). The outside source is the clips'
// own truth: clips/lanternfish_drift.truth.json, written by the renderer
// (clips/lantern_scene.cpp) that turns the lantern's hue by 110 degrees
// from 1.5 s, with the frames it spans and the CIEDE2000 of the region's
// mean colour at the end. The clean take of the same scene must read no
// drift worth a review.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <string>

#include <nlohmann/json.hpp>

#include "support/clips.h"

using namespace clipwarden::test;

namespace {

const std::string kClips = std::string(CLIPWARDEN_SOURCE_DIR) + "/clips/";
constexpr int kOnsetToleranceFrames = 6;  // the bound on the onset error

nlohmann::json read_json(const std::string& path) {
  std::ifstream in(path);
  return nlohmann::json::parse(in, nullptr, false);
}

// Runs `clipwarden analyze` on one demo clip; the report, or a discarded
// value (with a test failure) when the run did not produce one.
nlohmann::json analyze_demo(const TempDir& dir, const std::string& name) {
  const auto result = run_command({CLIPWARDEN_BINARY, "analyze", kClips + name + ".mp4", "--out",
                                   dir.file("out"), "--no-html", "--quiet"});
  EXPECT_TRUE(result.exit_code == 0 || result.exit_code == 1) << result.err;
  return read_json(dir.file("out/" + name + ".json"));
}

bool at_review_or_worse(const nlohmann::json& segment) {
  const std::string severity = segment.value("severity", "");
  return severity == "review" || severity == "reject";
}

}  // namespace

TEST(DriftDemoCli, LanternHueTurnIsADriftSegmentFromItsOnset) {
  if (!std::filesystem::exists(kClips + "lanternfish_drift.mp4"))
    GTEST_SKIP() << "demo clip missing";
  const auto truth = read_json(kClips + "lanternfish_drift.truth.json");
  ASSERT_FALSE(truth.is_discarded());
  const auto& defect = truth["defects"][0];
  ASSERT_EQ(defect["class"], "colour_drift");
  // The hue starts turning at times_s[0] (1.54 s); the last frame before
  // it is the onset a drift segment should start at.
  const double onset_s = defect["times_s"][0].get<double>();
  const double fps = truth["source"]["fps"].get<double>();
  const int onset_frame = static_cast<int>(std::floor(onset_s * fps));
  TempDir dir;
  const auto report = analyze_demo(dir, "lanternfish_drift");
  ASSERT_FALSE(report.is_discarded());
  const nlohmann::json* found = nullptr;
  for (const auto& s : report["segments"]) {
    if (s["metric"] == "drift" && at_review_or_worse(s)) {
      found = &s;
      break;
    }
  }
  ASSERT_NE(found, nullptr) << "no drift segment at review or worse";
  EXPECT_NEAR((*found)["start_frame"].get<int>(), onset_frame, kOnsetToleranceFrames);
  EXPECT_GE((*found)["end_frame"].get<int>(), defect["frames"][1].get<int>() - 12)
      << "the lantern is followed to the end of its drift";
  // Its colour: at the end the renderer reports ΔE00 45.8 of the region's
  // mean colour; the followed object's mean colour (its points on the
  // lantern, some on its glow) must read a large part of it.
  const double truth_de00 = defect["strength"].get<double>();
  double peak_de00 = 0;
  for (const auto& frame : report["frames"]) {
    if (frame["drift_color_de00"].is_number())
      peak_de00 = std::max(peak_de00, frame["drift_color_de00"].get<double>());
  }
  EXPECT_GT(peak_de00, 0.6 * truth_de00);
  EXPECT_LT(peak_de00, 1.2 * truth_de00);
}

TEST(DriftDemoCli, CleanLanternTakeHasNoDriftWorthAReview) {
  if (!std::filesystem::exists(kClips + "lanternfish_clean.mp4"))
    GTEST_SKIP() << "demo clip missing";
  TempDir dir;
  const auto report = analyze_demo(dir, "lanternfish_clean");
  ASSERT_FALSE(report.is_discarded());
  for (const auto& s : report["segments"]) {
    if (s["metric"] == "drift") EXPECT_FALSE(at_review_or_worse(s)) << s.dump();
  }
  bool lantern_followed = false;
  for (const auto& o : report["objects"]) lantern_followed |= o["kind"] == "moving";
  EXPECT_TRUE(lantern_followed) << "the lantern is followed as a moving object";
}
