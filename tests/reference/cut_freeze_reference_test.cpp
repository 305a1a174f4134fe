// cut and freeze against FFmpeg's own detectors on real footage:
//  - cut vs the scdet filter (scene change detection) on opencv-doc's
//    Megamind.avi, an animated trailer with hard cuts;
//  - freeze vs the freezedetect filter on a clip with frames held still.
#include <gtest/gtest.h>

#include <cmath>
#include <regex>

#include "framelint/analysis.h"
#include "support/clips.h"

using namespace framelint;
using namespace framelint::test;

namespace {

Policy cut_and_freeze_policy() {
  Policy p = default_policy();
  return p;
}

// Times (s) that an FFmpeg filter reports in its metadata key, via
// `-vf FILTER,metadata=print:file=-`.
std::vector<double> ffmpeg_event_times(const std::string& clip, const std::string& filter, const std::string& key) {
  auto r = run_command({"ffmpeg", "-v", "error", "-nostdin", "-i", clip, "-vf",
                        filter + ",metadata=print:file=-", "-f", "null", "-"});
  std::vector<double> out;
  std::regex re(key + "=([0-9.]+)");
  for (std::sregex_iterator it(r.out.begin(), r.out.end(), re), end; it != end; ++it)
    out.push_back(std::stod((*it)[1]));
  return out;
}

}  // namespace

TEST(CutReference, MatchesFfmpegScdetOnMegamind) {
  FRAMELINT_SKIP_WITHOUT_TOOL("ffmpeg");
  FRAMELINT_SKIP_WITHOUT_DATA(clip, "Megamind.avi");
  // scdet's threshold 10 (of 100) [FFmpeg filter documentation: default 10].
  const auto cuts = ffmpeg_event_times(clip, "scdet=threshold=10", "lavfi.scd.time");
  ASSERT_GE(cuts.size(), 3u) << "scdet found too few cuts to compare";
  const double first_pts = ffprobe_frame_times(clip).front();
  auto report = analyze_clip(clip, AnalysisSettings{}, cut_and_freeze_policy());
  ASSERT_TRUE(report.ok()) << report.error().message();
  std::vector<double> ours;
  for (const auto& s : report->segments)
    if (s.metric == "cut") ours.push_back(s.start_s + first_pts);
  // Same cuts, each within half a frame interval (FFmpeg times are absolute
  // presentation times, ours are relative to the first frame).
  ASSERT_EQ(ours.size(), cuts.size());
  const double half_frame = 0.5 / report->clip.fps;
  for (size_t i = 0; i < cuts.size(); ++i) EXPECT_NEAR(ours[i], cuts[i], half_frame) << "cut " << i;
}

TEST(FreezeReference, MatchesFfmpegFreezedetect) {
  FRAMELINT_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  // 4 s of moving test pattern at 10 fps with frame 14 shown 10 times
  // (`loop` repeats it 9 more times; setpts renumbers so timing stays even):
  // frames 15..23 repeat frame 14.
  const std::string clip = dir.file("held.mkv");
  ASSERT_EQ(make_lavfi_clip(clip, "testsrc2=size=320x240:rate=10:duration=4",
                            {"-vf", "loop=loop=9:size=1:start=14,setpts=N/10/TB", "-c:v", "ffv1"}),
            "");
  // freezedetect: noise -60 dB, minimum duration 0.5 s [FFmpeg filter docs].
  const auto starts = ffmpeg_event_times(clip, "freezedetect=n=-60dB:d=0.5", "lavfi.freezedetect.freeze_start");
  ASSERT_EQ(starts.size(), 1u);
  auto report = analyze_clip(clip, AnalysisSettings{}, cut_and_freeze_policy());
  ASSERT_TRUE(report.ok()) << report.error().message();
  const auto& freeze = report->find_series("freeze")->values;
  for (int i = 1; i < 40; ++i) EXPECT_EQ(freeze[i], (i >= 15 && i <= 23) ? 1.0 : 0.0) << "frame " << i;
  // freezedetect reports the start as the time of the first repeated frame's
  // predecessor (the frame that stays on screen) [observed with FFmpeg 5.1].
  EXPECT_NEAR(starts[0], report->frame_times_s[14], 0.051);
}
