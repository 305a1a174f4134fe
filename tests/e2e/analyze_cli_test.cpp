// `clipwarden analyze` end to end, through the built binary: reports that
// match the schema, frame counts that match ffprobe (the outside source),
// and bad inputs that end in one clear line and exit status 3 while every
// good clip in the same batch is still reported (docs/cli.md, exit statuses).
#include <gtest/gtest.h>

#include <fstream>

#include "clipwarden/report_io.h"
#include "support/clips.h"

using namespace clipwarden;
using namespace clipwarden::test;

namespace {

CommandResult clipwarden_cli(std::vector<std::string> args) {
  args.insert(args.begin(), CLIPWARDEN_BINARY);
  return run_command(args);
}

nlohmann::json read_json(const std::string& path) {
  std::ifstream in(path);
  return nlohmann::json::parse(in, nullptr, false);
}

size_t count_lines(const std::string& text) { return std::count(text.begin(), text.end(), '\n'); }

}  // namespace

TEST(AnalyzeCli, WritesASchemaValidReportWithFfprobesFrames) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::string clip = dir.file("harbour pan.mp4");
  ASSERT_EQ(make_lavfi_clip(clip, "testsrc2=size=320x180:rate=12:duration=2", {"-pix_fmt", "yuv420p"}), "");
  const auto result = clipwarden_cli({"analyze", clip, "--out", dir.file("out"), "--no-html", "--quiet"});
  ASSERT_TRUE(result.exit_code == 0 || result.exit_code == 1) << result.err;
  const auto report = read_json(dir.file("out/harbour_pan.json"));
  ASSERT_FALSE(report.is_discarded());
  auto valid = validate_report_json(report, "harbour_pan.json");
  EXPECT_TRUE(valid.ok()) << (valid.ok() ? "" : valid.error().message());
  const auto times = ffprobe_frame_times(clip);  // outside source: ffprobe
  ASSERT_EQ(report["frames"].size(), times.size());
  for (size_t i = 0; i < times.size(); ++i)
    EXPECT_NEAR(report["frames"][i]["t"].get<double>(), times[i] - times[0], 1e-6) << "frame " << i;
  EXPECT_TRUE(report["frames"][0]["warp_error"].is_null());
  EXPECT_TRUE(report["frames"][1]["warp_error"].is_number());
}

TEST(AnalyzeCli, BadInputsFailCleanlyAndGoodClipsAreStillReported) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::string good = dir.file("good.mp4");
  ASSERT_EQ(make_lavfi_clip(good, "testsrc2=size=160x120:rate=10:duration=1", {"-pix_fmt", "yuv420p"}), "");
  const std::string audio_only = dir.file("voice.m4a");
  ASSERT_EQ(make_lavfi_clip(audio_only, "sine=frequency=440:duration=1"), "");
  {
    std::ifstream in(good, std::ios::binary);
    std::string bytes((std::istreambuf_iterator<char>(in)), {});
    std::ofstream(dir.file("truncated.mp4"), std::ios::binary) << bytes.substr(0, bytes.size() / 3);
  }
  std::string noise(20000, '\0');
  uint32_t x = 12345;
  for (auto& c : noise) c = static_cast<char>((x = x * 1664525u + 1013904223u) >> 24);
  std::ofstream(dir.file("noise.mp4"), std::ios::binary) << noise;
  std::ofstream(dir.file("empty.mp4"));
  std::ofstream(dir.file("notes.txt")) << "shot list for the harbour sequence\n";
  std::filesystem::create_directories(dir.file("no frames"));

  const std::vector<std::string> bad = {dir.file("truncated.mp4"), dir.file("noise.mp4"), dir.file("empty.mp4"),
                                        dir.file("notes.txt"), audio_only, dir.file("no frames")};
  std::vector<std::string> args = {"analyze", "--out", dir.file("out"), "--no-html", "--quiet", good};
  args.insert(args.end(), bad.begin(), bad.end());
  args.push_back(good);  // a good clip after the bad ones is reported too
  const auto result = clipwarden_cli(args);
  EXPECT_EQ(result.exit_code, 3) << result.err;
  EXPECT_TRUE(std::filesystem::exists(dir.file("out/good.json")));
  EXPECT_TRUE(std::filesystem::exists(dir.file("out/good-2.json")));
  // One line per unreadable input, each naming it.
  size_t named = 0;
  for (const auto& path : bad) named += result.err.find(path) != std::string::npos;
  EXPECT_EQ(named, bad.size()) << result.err;
  EXPECT_LE(count_lines(result.err), bad.size()) << result.err;
  EXPECT_EQ(result.err.find("Assertion"), std::string::npos);
}

TEST(AnalyzeCli, UsageErrorsExitWithStatus2) {
  EXPECT_EQ(clipwarden_cli({"analyze"}).exit_code, 2);
  EXPECT_EQ(clipwarden_cli({"analyze", "x.mp4", "--width", "ten"}).exit_code, 2);
  EXPECT_EQ(clipwarden_cli({"analyze", "x.mp4", "--preset", "slow"}).exit_code, 2);
  EXPECT_EQ(clipwarden_cli({"no-such-command"}).exit_code, 2);
  const auto help = clipwarden_cli({"analyze", "--help"});
  EXPECT_EQ(help.exit_code, 0);
  EXPECT_NE(help.out.find("usage: clipwarden analyze"), std::string::npos);
  const auto version = clipwarden_cli({"--version"});
  EXPECT_EQ(version.exit_code, 0);
  EXPECT_EQ(version.out.rfind("clipwarden ", 0), 0u);
}
