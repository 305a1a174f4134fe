// `clipwarden compare` on reports of real footage: the first 15 s of
// OpenCV's vtest.avi (opencv-doc; static-camera street) cut by FFmpeg into
// ten 1.5 s clips for A, and the same ten clips for B with flicker injected
// by FFmpeg's eq filter (brightness +0.12 on every other frame). Both sides
// are judged by the built `clipwarden gate`; compare must find B worse
// on flicker and see no difference where nothing changed (freeze).
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>

#include "support/compare_cli.h"
#include "support/compare_python.h"

namespace {

using clipwarden::test::shell_quoted;
using nlohmann::json;

constexpr const char* kFootage = "/usr/share/doc/opencv-doc/examples/data/vtest.avi";

int exit_status(const std::string& command) {
  const int status = std::system((command + " >/dev/null 2>&1").c_str());
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}
bool shell_ok(const std::string& command) { return exit_status(command) == 0; }

// Ten 1.5 s clips at 320 px wide, each starting on a key frame.
bool cut_clips(const std::string& folder, const std::string& extra_filter) {
  std::filesystem::create_directories(folder);
  return shell_ok("ffmpeg -v error -i " + shell_quoted(kFootage) + " -t 15 -vf " +
                  shell_quoted("scale=320:-2" + extra_filter) +
                  " -c:v libx264 -crf 18 -pix_fmt yuv420p -force_key_frames "
                  "'expr:gte(t,n_forced*1.5)' -f segment -segment_time 1.5 -reset_timestamps 1 " +
                  shell_quoted(folder + "/p%02d.mp4"));
}

}  // namespace

TEST(CompareRealClips, InjectedFlickerOnStreetFootage) {
  if (::access(kFootage, R_OK) != 0)
    GTEST_SKIP() << kFootage << " is missing (Debian package opencv-doc)";
  if (!shell_ok("ffmpeg -version"))
    GTEST_SKIP() << "ffmpeg is not installed (Debian package ffmpeg)";
  clipwarden::test::TempFolder root("compare-real");
  ASSERT_TRUE(cut_clips(root.file("clips_a"), ""));
  ASSERT_TRUE(cut_clips(root.file("clips_b"), ",eq=brightness=0.12*mod(n\\,2):eval=frame"));
  const std::string binary = CLIPWARDEN_BINARY;
  // Each side goes through `clipwarden gate` with a manifest naming the
  // prompt of each clip, so compare reads the gate's real queue.jsonl and
  // pairs by prompt_id. The gate exits 1 when its policy rejects a clip, as
  // it may for B's.
  for (const char* side : {"a", "b"}) {
    const std::string manifest = root.file(std::string("manifest_") + side + ".jsonl");
    {
      std::ofstream out(manifest);
      for (int i = 0; i < 10; ++i) {
        char clip[32];
        std::snprintf(clip, sizeof clip, "/clips_%s/p%02d.mp4", side, i);
        out << json{{"path", root.path() + clip},
                    {"id", std::string(side) + std::to_string(i)},
                    {"prompt_id", "street-" + std::to_string(i)},
                    {"model", std::string("ckpt-") + side}}
                   .dump()
            << "\n";
      }
    }
    const int gated = exit_status(binary + " gate " + shell_quoted(manifest) + " --out " +
                                  shell_quoted(root.file(side)) + " --width 320 --quiet");
    ASSERT_TRUE(gated == 0 || gated == 1) << "gate exited " << gated << " for " << side;
  }

  const std::string args = shell_quoted(root.file("a")) + " " + shell_quoted(root.file("b")) +
                           " --out " + shell_quoted(root.file("out")) + " --quiet";
  EXPECT_EQ(clipwarden::test::run_compare(args + " --fail-if-worse flicker"), 1);
  ASSERT_EQ(clipwarden::test::run_compare(args), 0);
  const json c = clipwarden::test::read_json_file(root.file("out") + "/compare.json");
  ASSERT_FALSE(c.is_discarded());
  EXPECT_EQ(c["pairs"].size(), 10u);
  EXPECT_EQ(c["pair_by"], "prompt_id");
  const json* flicker = clipwarden::test::find_compared(c, "flicker", "p95");
  ASSERT_NE(flicker, nullptr);
  EXPECT_EQ((*flicker)["better"], "a");
  EXPECT_LT((*flicker)["p_holm"].get<double>(), 0.05);
  EXPECT_EQ((*flicker)["wins_a"], 10);
  const json* freeze = clipwarden::test::find_compared(c, "freeze", "p95");
  if (freeze) EXPECT_EQ((*freeze)["better"], "neither");
  EXPECT_EQ(clipwarden::test::find_compared(c, "luminance", "p95"), nullptr);  // descriptive
}
