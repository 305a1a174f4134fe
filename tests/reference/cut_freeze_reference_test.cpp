// cut and freeze against FFmpeg's own detectors on real footage:
//  - cut vs the scdet filter (scene change detection) on opencv-doc's
//    Megamind.avi, an animated trailer with hard cuts;
//  - freeze vs the freezedetect filter on a clip with frames held still.
#include <gtest/gtest.h>

#include <cmath>
#include <regex>

#include "clipwarden/analysis.h"
#include "support/clips.h"

using namespace clipwarden;
using namespace clipwarden::test;

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
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  CLIPWARDEN_SKIP_WITHOUT_DATA(clip, "Megamind.avi");
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
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  // 4 s of moving test pattern at 10 fps with one frame shown 10 times
  // (`loop` repeats it 9 more times; setpts keeps the timing even).
  const std::string clip = dir.file("held.mkv");
  ASSERT_EQ(make_lavfi_clip(clip, "testsrc2=size=320x240:rate=10:duration=4",
                            {"-vf", "loop=loop=9:size=1:start=14,setpts=N/10/TB", "-c:v", "ffv1"}),
            "");
  // freezedetect with noise -60 dB and a 0.5 s minimum [FFmpeg filter
  // documentation] says where the picture stands still: from the held
  // frame's time to the time of the first frame that differs again.
  const auto starts = ffmpeg_event_times(clip, "freezedetect=n=-60dB:d=0.5", "lavfi.freezedetect.freeze_start");
  const auto ends = ffmpeg_event_times(clip, "freezedetect=n=-60dB:d=0.5", "lavfi.freezedetect.freeze_end");
  ASSERT_EQ(starts.size(), 1u);
  ASSERT_EQ(ends.size(), 1u);
  auto report = analyze_clip(clip, AnalysisSettings{}, cut_and_freeze_policy());
  ASSERT_TRUE(report.ok()) << report.error().message();
  const double first_pts = ffprobe_frame_times(clip).front();
  const auto& freeze = report->find_series("freeze")->values;
  int repeats = 0;
  for (size_t i = 1; i < freeze.size(); ++i) {
    // A frame repeats its predecessor when it lies strictly inside the still stretch.
    const double t = report->frame_times_s[i] + first_pts;
    const bool inside = t > starts[0] + 1e-6 && t < ends[0] - 1e-6;
    EXPECT_EQ(freeze[i], inside ? 1.0 : 0.0) << "frame " << i << " at " << t << " s";
    repeats += inside;
  }
  EXPECT_EQ(repeats, 9);
}
