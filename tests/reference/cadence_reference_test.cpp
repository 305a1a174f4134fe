// Frame cadences against FFmpeg: clips whose pictures FFmpeg's fps filter
// stores several times (8 fps content in a 24 fps container: each picture
// 3 times; 24 fps content in 30 fps: one picture in four twice), checked
// against FFmpeg's mpdecimate filter, which drops frames that repeat the
// one before, and a hold longer than the cadence against freezedetect.
#include <gtest/gtest.h>

#include <regex>

#include "clipwarden/analysis.h"
#include "support/clips.h"

using namespace clipwarden;
using namespace clipwarden::test;

namespace {

// Presentation times of the frames mpdecimate keeps, from showinfo's log.
// mpdecimate=max=0 keeps a frame unless it repeats the previous kept one
// [FFmpeg filter documentation]; for exact copies that is our test too.
std::vector<double> mpdecimate_kept_times(const std::string& clip) {
  auto r = run_command({"ffmpeg", "-v", "info", "-nostdin", "-i", clip, "-vf",
                        "mpdecimate,showinfo", "-f", "null", "-"});
  std::vector<double> out;
  std::regex re("pts_time:([0-9.]+)");
  for (std::sregex_iterator it(r.err.begin(), r.err.end(), re), end; it != end; ++it)
    out.push_back(std::stod((*it)[1]));
  return out;
}

Report analyse(const std::string& clip) {
  auto report = analyze_clip(clip, AnalysisSettings{}, default_policy());
  EXPECT_TRUE(report.ok()) << (report.ok() ? "" : report.error().message());
  return report.ok() ? *report : Report{};
}

bool has_segment(const Report& r, const std::string& metric) {
  for (const auto& s : r.segments)
    if (s.metric == metric) return true;
  return false;
}

}  // namespace

TEST(CadenceReference, EachPictureStoredThreeTimes) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::string clip = dir.file("8in24.mkv");
  ASSERT_EQ(make_lavfi_clip(clip, "testsrc2=size=320x240:rate=8:duration=3",
                            {"-vf", "fps=24", "-c:v", "ffv1"}),
            "");
  const Report r = analyse(clip);
  ASSERT_TRUE(r.summary.details.contains("cadence"));
  const auto& c = r.summary.details["cadence"];
  EXPECT_EQ(c["stored_frames"], 72);
  EXPECT_EQ(c["pictures"], 24);
  EXPECT_EQ(c["analysed_frames"], 24);
  EXPECT_EQ(c["usual_repeats"], 2);
  EXPECT_NEAR(c["content_fps"].get<double>(), 8.0, 0.01);
  // The analysed frames are the ones mpdecimate keeps, at their own times.
  const auto kept = mpdecimate_kept_times(clip);
  const double first_pts = ffprobe_frame_times(clip).front();
  ASSERT_EQ(kept.size(), r.frame_times_s.size());
  for (size_t i = 0; i < kept.size(); ++i)
    EXPECT_NEAR(r.frame_times_s[i] + first_pts, kept[i], 1e-3) << i;
  ASSERT_EQ(c["source_frames"].size(), kept.size());
  EXPECT_EQ(c["source_frames"][5], 15);
  // The cadence is not a freeze (before: freeze mean 0.67, a reject).
  EXPECT_FALSE(has_segment(r, "freeze"));
  EXPECT_EQ(r.find_summary("freeze")->max, 0.0);
}

TEST(CadenceReference, PulldownRepeatsOneInFive) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::string clip = dir.file("24in30.mkv");
  ASSERT_EQ(make_lavfi_clip(clip, "testsrc2=size=320x240:rate=24:duration=2",
                            {"-vf", "fps=30", "-c:v", "ffv1"}),
            "");
  const Report r = analyse(clip);
  ASSERT_TRUE(r.summary.details.contains("cadence"));
  const auto& c = r.summary.details["cadence"];
  EXPECT_EQ(c["usual_repeats"], 1);
  EXPECT_EQ(c["pictures"], 48);
  EXPECT_NEAR(c["repeated_share"].get<double>(), 0.25, 0.05);
  EXPECT_EQ(mpdecimate_kept_times(clip).size(), r.frame_times_s.size());
  EXPECT_FALSE(has_segment(r, "freeze"));
}

TEST(CadenceReference, HoldLongerThanTheCadenceIsAFreeze) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  // 8 fps content, picture 20 held for 12 content frames (1.5 s), then each
  // picture stored 3 times at 24 fps.
  const std::string clip = dir.file("held.mkv");
  ASSERT_EQ(
      make_lavfi_clip(clip, "testsrc2=size=320x240:rate=8:duration=5",
                      {"-vf", "loop=loop=11:size=1:start=20,setpts=N/8/TB,fps=24", "-c:v", "ffv1"}),
      "");
  const Report r = analyse(clip);
  ASSERT_TRUE(r.summary.details.contains("cadence"));
  EXPECT_EQ(r.summary.details["cadence"]["usual_repeats"], 2);
  // freezedetect [FFmpeg filter documentation] says where the picture stands still.
  auto r2 = run_command({"ffmpeg", "-v", "error", "-nostdin", "-i", clip, "-vf",
                         "freezedetect=n=-60dB:d=0.5,metadata=print:file=-", "-f", "null", "-"});
  std::smatch m;
  ASSERT_TRUE(std::regex_search(r2.out, m, std::regex("freeze_start=([0-9.]+)")));
  const double still_from = std::stod(m[1]) - ffprobe_frame_times(clip).front();
  const Segment* freeze = nullptr;
  for (const auto& s : r.segments)
    if (s.metric == "freeze") freeze = &s;
  ASSERT_NE(freeze, nullptr);
  // Our segment starts at the first kept repeat, one content interval after
  // the picture first shows.
  EXPECT_NEAR(freeze->start_s, still_from + 1.0 / 8, 1.0 / 24 + 1e-3);
  EXPECT_NEAR(freeze->end_s - still_from, 1.5 - 1.0 / 8, 1.0 / 8 + 1e-3);
  EXPECT_EQ(r.verdict.status, Verdict::reject);  // 1.4 s still >= the 1 s reject level
}
