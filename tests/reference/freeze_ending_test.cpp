// freeze and an edited freeze-frame ending, made with FFmpeg's own editing
// filters from real footage (opencv-doc vtest.avi: a still camera over a
// hall with people walking, 10 fps):
//  - tpad=stop_mode=clone holds the last frame as an editor's freeze frame
//    does, fade=t=out then takes that held picture to black: one picture to
//    the end, no motion that stops and starts again. FFmpeg's freezedetect
//    sees the hold; the freeze metric leaves it out and says so in a note;
//  - loop holds a frame in the middle of the shot, after which the people
//    walk on: a freeze, with or without a fade over the motion after it.
// Encoded with libx264 (yuv420p) so the held frames differ by compression
// noise, as in real files.
#include <gtest/gtest.h>

#include <string>
#include <vector>

#include "clipwarden/analysis.h"
#include "support/clips.h"

using namespace clipwarden;
using namespace clipwarden::test;

namespace {

// vtest.avi's first `frames` frames at 320x240 through `edit`, as H.264.
std::string make_edit(const std::string& source, const std::string& out, const std::string& edit) {
  const auto r = run_command({"ffmpeg", "-v", "error", "-nostdin", "-y", "-i", source, "-vf",
                              "scale=320:240," + edit + ",setpts=N/10/TB", "-r", "10", "-c:v",
                              "libx264", "-crf", "20", "-pix_fmt", "yuv420p", out});
  return r.exit_code == 0 ? "" : r.err;
}

Report analyse(const std::string& clip) {
  AnalysisSettings settings;
  settings.working_long_side = 320;
  auto report = analyze_clip(clip, settings, default_policy());
  EXPECT_TRUE(report.ok()) << report.error().message();
  return report.ok() ? *report : Report{};
}

bool has_freeze_reason(const Report& r) {
  for (const std::string& reason : r.verdict.reasons)
    if (reason.rfind("freeze ", 0) == 0) return true;
  return false;
}

int repeats(const Report& r) {
  int n = 0;
  for (double v : r.find_series("freeze")->values) n += v == 1.0;
  return n;
}

}  // namespace

TEST(FreezeEnding, HeldPictureFadedToBlackIsAnEditNotAFreeze) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  CLIPWARDEN_SKIP_WITHOUT_DATA(vtest, "vtest.avi");
  TempDir dir;
  const std::string clip = dir.file("ending.mp4");
  // 30 moving frames, frame 29 held for 40 more, faded out over the last 25
  // (frames 45-69): 1.5 s still, then 2.5 s of fade.
  ASSERT_EQ(make_edit(vtest, clip,
                      "trim=end_frame=30,tpad=stop_mode=clone:stop=40,"
                      "fade=t=out:start_frame=45:nb_frames=25"),
            "");
  // FFmpeg's freezedetect (-60 dB, 1 s) [FFmpeg filter documentation]
  // sees the hold: the test is about a real still stretch.
  const auto starts = ffmpeg_frame_metadata(clip, "freezedetect=n=-60dB:d=1", "lavfi.freezedetect.freeze_start");
  ASSERT_EQ(starts.size(), 1u);
  EXPECT_NEAR(starts[0], 2.9, 0.15);
  const Report r = analyse(clip);
  EXPECT_EQ(repeats(r), 0);
  EXPECT_FALSE(has_freeze_reason(r)) << r.verdict.reasons.front();
  bool told = false;
  for (const std::string& note : r.notes) told = told || note.find("freeze-frame ending") != std::string::npos;
  EXPECT_TRUE(told);
}

TEST(FreezeEnding, HoldInsideTheShotStaysAFreezeWithOrWithoutAFadeAfterIt) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  CLIPWARDEN_SKIP_WITHOUT_DATA(vtest, "vtest.avi");
  TempDir dir;
  // Frame 30 shown 16 times (1.6 s), then the people walk on.
  const std::string hold = "trim=end_frame=55,loop=loop=15:size=1:start=30";
  for (const std::string& after : {std::string(), std::string(",fade=t=out:start_frame=46:nb_frames=24")}) {
    const std::string clip = dir.file(after.empty() ? "middle.mp4" : "middle_fade.mp4");
    ASSERT_EQ(make_edit(vtest, clip, hold + after), "");
    const Report r = analyse(clip);
    // The stored hold: 15 repeats of frame 30 (a few more or fewer where
    // x264 spends bits on the first repeats).
    EXPECT_GE(repeats(r), 12) << clip;
    EXPECT_EQ(r.verdict.status, Verdict::reject) << clip;
    EXPECT_TRUE(has_freeze_reason(r)) << clip;
    for (const std::string& note : r.notes) EXPECT_EQ(note.find("freeze-frame"), std::string::npos) << clip;
  }
}
