// Flash screening end to end (decode, analysis, policy) on clips made by
// FFmpeg's lavfi sources with known flash rates, and on real footage
// (opencv-doc Megamind.avi, an animated trailer with cuts, which does not
// flash). Expected outcomes follow the WCAG 2.x definitions quoted in
// analyzer/flash/flash_detector.h: more than 3 flashes in any one second
// over the area rule is a hazard, and the default policy rejects it.
#include <gtest/gtest.h>

#include <algorithm>

#include "clipwarden/analysis.h"
#include "support/clips.h"

using namespace clipwarden;
using namespace clipwarden::test;

namespace {

Report analyse(const std::string& clip) {
  AnalysisSettings settings;
  settings.preset = Preset::fast;  // flash needs no flow; keep the test quick
  auto report = analyze_clip(clip, settings, default_policy());
  EXPECT_TRUE(report.ok()) << (report.ok() ? "" : report.error().message());
  return report.ok() ? std::move(report.value()) : Report{};
}

bool mentions_flash(const VerdictResult& v) {
  return std::any_of(v.reasons.begin(), v.reasons.end(),
                     [](const std::string& r) { return r.find("flash") != std::string::npos; });
}

// A full-frame alternation made by geq on frame numbers: `half` frames dark
// (luma 16 = black), `half` frames light (235 = white) at `rate` fps.
std::string alternation(const TempDir& dir, const std::string& name, int rate, int half) {
  const std::string clip = dir.file(name);
  const std::string on = "lt(mod(N," + std::to_string(2 * half) + ")," + std::to_string(half) + ")";
  const std::string err = make_lavfi_clip(
      clip, "color=c=black:s=160x120:r=" + std::to_string(rate) + ":d=3",
      {"-vf", "format=yuv444p,geq=lum='if(" + on + ",16,235)':cb=128:cr=128", "-c:v", "ffv1"});
  EXPECT_EQ(err, "");
  return clip;
}

}  // namespace

TEST(FlashReference, FiveHertzLavfiAlternationIsRejected) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  // 30 fps, 3 frames per state: 5 dark-light cycles per second.
  const Report r = analyse(alternation(dir, "five.mkv", 30, 3));
  const auto& d = r.summary.details.at("flash");
  EXPECT_EQ(d.at("hazard"), true);
  EXPECT_EQ(d.at("max_flashes_per_s"), 5);
  EXPECT_EQ(d.at("kind"), "general");
  EXPECT_EQ(r.verdict.status, Verdict::reject);
  EXPECT_TRUE(mentions_flash(r.verdict));
  EXPECT_FALSE(r.notes.empty());
}

TEST(FlashReference, TwoHertzLavfiAlternationIsNotAHazard) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  // 24 fps, 6 frames per state: 2 cycles per second.
  const Report r = analyse(alternation(dir, "two.mkv", 24, 6));
  const auto& d = r.summary.details.at("flash");
  EXPECT_EQ(d.at("hazard"), false);
  EXPECT_EQ(d.at("max_flashes_per_s"), 2);
  EXPECT_FALSE(mentions_flash(r.verdict) && r.verdict.status == Verdict::reject);
}

TEST(FlashReference, SaturatedRedLavfiAlternationTriggersTheRedRule) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  // Pure red against the grey of about the same relative luminance (sRGB
  // 127), 3 frames each at 30 fps: no general flash, 5 red flashes a second.
  const std::string clip = dir.file("red.mkv");
  const std::string on = "lt(mod(N,6),3)";
  ASSERT_EQ(make_lavfi_clip(clip, "color=c=black:s=160x120:r=30:d=3",
                            {"-vf",
                             "format=gbrp,geq=r='if(" + on + ",255,127)':g='if(" + on +
                                 ",0,127)':b='if(" + on + ",0,127)'",
                             "-c:v", "ffv1"}),
            "");
  const Report r = analyse(clip);
  const auto& d = r.summary.details.at("flash");
  EXPECT_EQ(d.at("kind"), "red");
  EXPECT_EQ(d.at("red_max_flashes_per_s"), 5);
  EXPECT_EQ(d.at("general_max_flashes_per_s"), 0);
  EXPECT_EQ(d.at("hazard"), true);
  EXPECT_EQ(r.verdict.status, Verdict::reject);
}

TEST(FlashReference, MegamindTrailerHasNoHazard) {
  CLIPWARDEN_SKIP_WITHOUT_DATA(clip, "Megamind.avi");
  const Report r = analyse(clip);
  const auto& d = r.summary.details.at("flash");
  EXPECT_EQ(d.at("hazard"), false);
  EXPECT_LE(d.at("max_flashes_per_s").get<int>(), 3);
  EXPECT_FALSE(mentions_flash(r.verdict) && r.verdict.status == Verdict::reject);
  RecordProperty("max_flashes_per_s", d.at("max_flashes_per_s").dump());
}
