// `clipwarden compare` on reports of real footage, the small study a team
// runs first: the first 12 s of OpenCV's vtest.avi (opencv-doc;
// static-camera street) cut by FFmpeg into eight 1.5 s clips ("prompts") for
// A, and the same eight clips for B with an obvious brightness pulse added by
// FFmpeg's eq filter (+0.12 on every other frame). Both sides are judged by
// the built `clipwarden gate`. With 8 prompts the exact paired tests cannot
// go below 2/256, so compare must say what that allows: flicker, exploratory
// by default, is worse in 8 of 8 prompts with its interval; named primary it
// is a verdict; and nothing changes where nothing was done (freeze).
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

constexpr int kPrompts = 8;

// Eight 1.5 s clips at 320 px wide, each starting on a key frame.
bool cut_clips(const std::string& folder, const std::string& extra_filter) {
  std::filesystem::create_directories(folder);
  return shell_ok("ffmpeg -v error -i " + shell_quoted(kFootage) + " -t 12 -vf " +
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
      for (int i = 0; i < kPrompts; ++i) {
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
  // A CI gate on flicker: it joins the primary family (coherence, pass
  // share, reject share, flicker p95: Holm's first step needs 4 * 2/256 =
  // 0.031 < 0.05, reachable at n = 8) and fails.
  EXPECT_EQ(clipwarden::test::run_compare(args + " --fail-if-worse flicker"), 1);
  ASSERT_EQ(clipwarden::test::run_compare(args), 0);
  const json c = clipwarden::test::read_json_file(root.file("out") + "/compare.json");
  ASSERT_FALSE(c.is_discarded());
  EXPECT_EQ(c["pairs"].size(), static_cast<size_t>(kPrompts));
  EXPECT_EQ(c["pair_by"], "prompt_id");

  // Default family: flicker is exploratory, worse in 8 of 8 prompts, with
  // the sign test's exact p (2/256) and an interval of the mean that
  // excludes zero; the headline says so in words.
  const json* flicker = clipwarden::test::find_compared(c, "flicker", "p95");
  ASSERT_NE(flicker, nullptr);
  EXPECT_EQ((*flicker)["family"], "exploratory");
  EXPECT_EQ((*flicker)["unadjusted_better"], "a");
  EXPECT_EQ((*flicker)["wins_a"], kPrompts);
  EXPECT_NEAR((*flicker)["sign_test"]["p_value"].get<double>(), 2.0 / 256, 1e-15);
  EXPECT_GT((*flicker)["ci_low"].get<double>(), 0.0);
  bool flicker_said = false, design_said = false;
  for (const auto& sentence : c["headline"]) {
    const std::string s = sentence.get<std::string>();
    flicker_said |= s.find("Exploratory") != std::string::npos &&
                    s.find("worse in 8 of 8 prompts on flicker p95") != std::string::npos &&
                    s.find("interval") != std::string::npos;
    design_said |= s.find("With 8 prompts") != std::string::npos &&
                   s.find("primary statistics can reach 0.05") != std::string::npos;
  }
  EXPECT_TRUE(flicker_said) << c["headline"].dump(1);
  EXPECT_TRUE(design_said) << c["headline"].dump(1);
  EXPECT_EQ(c["design"]["prompts"], kPrompts);
  EXPECT_DOUBLE_EQ(c["design"]["smallest_p"].get<double>(), 2.0 / 256);
  EXPECT_EQ(c["design"]["primary_can_reach_alpha"], true);

  // Named primary (alone), flicker is a verdict: B worse, Holm over one.
  ASSERT_EQ(clipwarden::test::run_compare(args + " --primary flicker:p95"), 0);
  const json named = clipwarden::test::read_json_file(root.file("out") + "/compare.json");
  const json* primary = clipwarden::test::find_compared(named, "flicker", "p95");
  ASSERT_NE(primary, nullptr);
  EXPECT_EQ((*primary)["better"], "a");
  EXPECT_LT((*primary)["p_holm"].get<double>(), 0.05);

  const json* freeze = clipwarden::test::find_compared(c, "freeze", "p95");
  if (freeze) EXPECT_EQ((*freeze)["unadjusted_better"], "neither");
  EXPECT_EQ(clipwarden::test::find_compared(c, "luminance", "p95"), nullptr);  // descriptive
}
