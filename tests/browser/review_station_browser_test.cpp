// The review station end to end in a real browser (headless Chromium driven
// by tests/browser/review_flow.py): open the queue, open a clip, play it,
// jump to a flagged segment, seek from the timeline, decide three clips by
// keyboard, reload: the decisions are on the page and in the store. The
// screenshots of each screen are kept in review-screens/ beside the test.
#include <gtest/gtest.h>
#include <signal.h>

#include <filesystem>

#include "support/clips.h"
#include "support/gate_files.h"
#include "support/review_server.h"

using namespace clipwarden::test;
namespace fs = std::filesystem;
using nlohmann::json;

TEST(ReviewStation, WorksTheQueueInChromium) {
  if (!fs::exists("/usr/bin/chromium")) GTEST_SKIP() << "chromium is not installed";
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  // Four clips: testsrc2 clips pass, so one flickers (ffmpeg's own
  // brightness filter swings +-0.2 at 2 Hz) to give the timeline a segment.
  std::string why;
  ASSERT_TRUE(make_varied_clips(dir.path() / "clips", 3).empty());
  ASSERT_EQ(make_lavfi_clip(dir.file("clips/flicker.mp4"), "testsrc2=size=160x120:rate=12:duration=2",
                            {"-vf", "eq=brightness='0.2*sin(2*PI*2*t)':eval=frame", "-pix_fmt", "yuv420p"}),
            "");
  auto gate = run_command({CLIPWARDEN_BINARY, "gate", dir.file("clips"), "--out", dir.file("out"), "--jobs", "1",
                           "--threads", "1", "--width", "160", "--quiet"});
  ASSERT_TRUE(gate.exit_code == 0 || gate.exit_code == 1) << gate.err;

  ReviewProcess server(dir.path() / "out", dir.path() / "log");
  ASSERT_TRUE(server.ok()) << server.log();
  const fs::path screens = fs::current_path() / "review-screens";
  const auto run = run_command({"/usr/bin/python3", std::string(CLIPWARDEN_SOURCE_DIR) + "/tests/browser/review_flow.py",
                                "/usr/bin/chromium", server.url(), screens.string()});
  ASSERT_EQ(run.exit_code, 0) << run.err << server.log();
  const json seen = json::parse(run.out);
  SCOPED_TRACE(seen.dump());
  EXPECT_TRUE(seen["errors"].empty());
  EXPECT_EQ(seen["queue"]["rows"], 4);
  EXPECT_EQ(seen["queue"]["left"], "4");
  EXPECT_EQ(seen["queue"]["strips"], 4) << "every row shows its frames";
  EXPECT_TRUE(seen["queue"]["violations"].empty());

  // Playing: the video advanced and the timeline's cursor followed it.
  EXPECT_GE(seen["playing"]["ready"].get<int>(), 2);
  EXPECT_GT(seen["playing"]["time"].get<double>(), 0.3);
  EXPECT_TRUE(seen["playing"]["violations"].empty());
  // The segment mark moved the video to the segment's start (one frame at
  // 12 fps of slack: browsers seek to a frame boundary).
  const json& segment = seen["segment"];
  ASSERT_GE(segment["marks"].get<int>(), 1);
  // The first mark is the first flagged (review or reject) segment, or the
  // first segment when none is flagged.
  double start = segment["segments"][0]["start_s"];
  for (const auto& s : segment["segments"])
    if (s["severity"] != "info") {
      start = s["start_s"];
      break;
    }
  EXPECT_NEAR(segment["time"].get<double>(), start, 1.0 / 12);
  EXPECT_GT(segment["cursor_x"].get<double>(), 0.0);
  // A click halfway along the timeline: the video goes to the middle.
  const json& click = seen["timeline_click"];
  const double duration = 2.0;  // the clip the page opened first is the flickering one (worst first)
  EXPECT_NEAR(click["time"].get<double>(), duration / 2, 0.25);

  // Three keys, three decisions, each opening the next clip.
  ASSERT_EQ(seen["decided"].size(), 3u);
  for (const auto& d : seen["decided"]) EXPECT_NE(d["clip"], d["then"]);
  EXPECT_EQ(seen["queue_after"]["left"], "1");
  int decided = 0;
  for (const auto& d : seen["queue_after"]["decided"]) decided += d != "";
  EXPECT_EQ(decided, 3);
  const json stored = json::parse(server.get("/api/decisions?token=" + server.token()).body)["decisions"];
  ASSERT_EQ(stored.size(), 3u);
  EXPECT_EQ(stored[0]["decision"], "reject");
  EXPECT_EQ(stored[1]["decision"], "keep");
  EXPECT_EQ(stored[2]["decision"], "second_look");
  for (const char* name : {"queue.png", "clip.png", "clip-segment.png", "queue-after.png"})
    EXPECT_GT(fs::file_size(screens / name), 1000u) << name;
  EXPECT_EQ(server.stop(SIGINT), 0);
}
