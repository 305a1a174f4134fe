// `clipwarden inject` end to end (the built binary): docs/cli.md's synopsis
// and exit statuses (0 done, 2 bad usage, 3 unreadable input), the written
// clip as ffprobe sees it, and the truth file.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>

#include <nlohmann/json.hpp>

#include "support/clips.h"
#include "support/inject_clips.h"

using namespace clipwarden;

namespace {

test::CommandResult clipwarden_cli(std::vector<std::string> args) {
  args.insert(args.begin(), CLIPWARDEN_BINARY);
  return test::run_command(args);
}

}  // namespace

TEST(InjectCli, WritesTheClipAndItsTruth) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffprobe");
  const test::TempDir dir;
  auto clean = test::write_synthetic_clip(dir.file("clean.mkv"), {96, 64}, 30, 15);
  ASSERT_TRUE(clean.ok()) << clean.error().message();
  const auto r = clipwarden_cli({"inject", *clean, "--defect", "flicker@5-12:strength=0.1", "--defect", "drop@20",
                                "-o", dir.file("out.mkv"), "--codec", "ffv1", "--seed", "3"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(r.out.find("2 defect(s)"), std::string::npos) << r.out;
  // ffprobe counts the frames the copy holds: one dropped.
  EXPECT_EQ(test::ffprobe_value(dir.file("out.mkv"), "stream=nb_read_frames", {"-count_frames"}), "29");
  std::ifstream in(dir.file("out.truth.json"));
  ASSERT_TRUE(in.good()) << "the truth file sits beside the clip by default";
  const auto truth = nlohmann::json::parse(in);
  EXPECT_EQ(truth["schema"], "clipwarden.inject-truth/1");
  EXPECT_EQ(truth["seed"], 3);
  ASSERT_EQ(truth["defects"].size(), 2u);
  EXPECT_EQ(truth["defects"][0]["frames"], nlohmann::json({5, 12}));
  EXPECT_EQ(truth["defects"][1]["frames"], nlohmann::json({20, 20}));
}

TEST(InjectCli, UsageErrorsNameTheirPartAndExitTwo) {
  const test::TempDir dir;
  auto clean = test::write_synthetic_clip(dir.file("clean.mkv"), {64, 48}, 10, 10);
  ASSERT_TRUE(clean.ok());
  const auto bad_spec = clipwarden_cli({"inject", *clean, "--defect", "flicker@3-x", "-o", dir.file("o.mkv")});
  EXPECT_EQ(bad_spec.exit_code, 2);
  EXPECT_NE(bad_spec.err.find("flicker@3-x"), std::string::npos) << bad_spec.err;
  const auto no_out = clipwarden_cli({"inject", *clean, "--defect", "flicker@3-5"});
  EXPECT_EQ(no_out.exit_code, 2);
  const auto bad_codec = clipwarden_cli({"inject", *clean, "--defect", "flicker@3-5", "-o", dir.file("o.mkv"),
                                        "--codec", "vp9"});
  EXPECT_EQ(bad_codec.exit_code, 2);
  EXPECT_NE(bad_codec.err.find("--codec"), std::string::npos);
  EXPECT_FALSE(std::filesystem::exists(dir.file("o.mkv")));
  const auto help = clipwarden_cli({"inject", "--help"});
  EXPECT_EQ(help.exit_code, 0);
  EXPECT_NE(help.out.find("--defect"), std::string::npos);
}

TEST(InjectCli, UnreadableInputExitsThree) {
  const test::TempDir dir;
  std::ofstream(dir.file("junk.mp4")) << "not a video";
  const auto r = clipwarden_cli({"inject", dir.file("junk.mp4"), "--defect", "flicker@1-2", "-o", dir.file("o.mp4")});
  EXPECT_EQ(r.exit_code, 3);
  EXPECT_NE(r.err.find("junk.mp4"), std::string::npos) << r.err;
}
