// `clipwarden gate` end to end through the built binary (docs/gate.md and
// docs/cli.md's exit statuses). Good clips are excerpts of real footage (OpenCV's
// vtest.avi street scene, cut and scaled by FFmpeg); the defect is a
// full-frame light/dark alternation made by FFmpeg's geq filter, six flashes
// a second, over the WCAG 2.x limit of three; the bad inputs are random
// bytes, a truncated file, an empty file and a text file.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>

#include "clipwarden/policy.h"
#include "support/clips.h"
#include "support/gate_files.h"

using namespace clipwarden;
using namespace clipwarden::test;
namespace fs = std::filesystem;

namespace {

CommandResult clipwarden_cli(std::vector<std::string> args) {
  args.insert(args.begin(), CLIPWARDEN_BINARY);
  return run_command(args);
}

std::vector<nlohmann::json> queue_of(const fs::path& out) {
  std::vector<nlohmann::json> lines;
  for (const auto& l : read_lines(out / "queue.jsonl")) lines.push_back(nlohmann::json::parse(l));
  return lines;
}

}  // namespace

TEST(GateCli, BatchJudgesGoodAndDefectiveClipsAndRecordsUnreadableOnes) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  CLIPWARDEN_SKIP_WITHOUT_DATA(vtest, "vtest.avi");
  TempDir dir;
  const std::string good_a = dir.file("street 1 — été.mp4"), good_b = dir.file("街 2.mp4");
  for (auto [clip, start] : {std::pair{good_a, 0}, std::pair{good_b, 30}}) {
    const auto r = run_command({"ffmpeg", "-v", "error", "-y", "-ss", std::to_string(start), "-t",
                                "2", "-i", vtest, "-vf", "scale=160:120", "-c:v", "libx264",
                                "-pix_fmt", "yuv420p", clip});
    ASSERT_EQ(r.exit_code, 0) << r.err;
  }
  const std::string flashing = dir.file("flashing.mp4");
  ASSERT_EQ(make_lavfi_clip(flashing, "color=c=gray:size=160x120:rate=24:duration=2",
                            {"-vf", "geq=lum='if(lt(mod(N,4),2),225,30)':cb=128:cr=128", "-pix_fmt",
                             "yuv420p"}),
            "");
  std::string noise(20000, '\0');
  uint32_t x = 7;
  for (auto& c : noise) c = static_cast<char>((x = x * 1664525u + 1013904223u) >> 24);
  write_text(dir.file("corrupt.mp4"), noise);
  write_text(dir.file("truncated.mp4"), read_text(good_a).substr(0, 3000));
  write_text(dir.file("empty.mp4"), "");
  write_text(dir.file("notes.txt"), "shot list for the harbour sequence\n");
  const std::vector<std::string> bad = {dir.file("corrupt.mp4"), dir.file("truncated.mp4"),
                                        dir.file("empty.mp4"), dir.file("notes.txt")};
  std::vector<std::string> args = {"gate", good_a, good_b, flashing};
  args.insert(args.end(), bad.begin(), bad.end());
  for (const std::string& a : {std::string("--out"), dir.file("out"), std::string("--jobs"),
                               std::string("2"), std::string("--no-html")})
    args.push_back(a);
  const auto result = clipwarden_cli(args);
  EXPECT_EQ(result.exit_code, 3) << result.err;  // an unreadable input outranks the rejected clip
  EXPECT_NE(result.out.find("2 pass / 0 review / 1 reject / 4 error (0 taken from the store)"),
            std::string::npos)
      << result.out;

  const auto queue = queue_of(dir.path() / "out");
  ASSERT_EQ(queue.size(), 7u);
  const std::vector<std::string> expected = {"pass",  "pass",  "reject", "error",
                                             "error", "error", "error"};
  for (size_t i = 0; i < queue.size(); ++i) {
    EXPECT_EQ(queue[i]["index"], i);
    EXPECT_EQ(queue[i]["verdict"], expected[i]) << queue[i].dump();
  }
  EXPECT_EQ(queue[0]["path"], good_a);
  EXPECT_TRUE(fs::exists(dir.path() / "out" / queue[0]["report"].get<std::string>()));
  EXPECT_TRUE(fs::exists(dir.path() / "out" / queue[1]["report"].get<std::string>()));
  EXPECT_FALSE(queue[2]["reasons"].empty());
  for (size_t i = 3; i < 7; ++i) {
    const std::string name = fs::path(bad[i - 3]).filename().string();
    EXPECT_NE(queue[i]["error"].get<std::string>().find(name), std::string::npos)
        << queue[i].dump();
    EXPECT_NE(result.err.find(name), std::string::npos) << result.err;
    EXPECT_TRUE(queue[i]["report"].is_null());
  }
  const std::string page = read_text(dir.path() / "out" / "index.html");
  EXPECT_LT(page.find("flashing.mp4"),
            page.find("corrupt.mp4"));                         // worst first: reject before error
  EXPECT_LT(page.find("corrupt.mp4"), page.find("街 2.mp4"));  // error before pass

  // --fail-on: the rejected clip alone fails the gate (1); the good ones pass.
  EXPECT_EQ(clipwarden_cli({"gate", flashing, "--out", dir.file("out2"), "--quiet", "--no-html"})
                .exit_code,
            1);
  EXPECT_EQ(clipwarden_cli({"gate", good_a, good_b, "--out", dir.file("out2"), "--quiet",
                           "--fail-on", "review", "--no-html"})
                .exit_code,
            0);
}

TEST(GateCli, FoldersAndManifestsKeepTheirFields) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  ASSERT_EQ(make_varied_clips(dir.path() / "batch" / "day 1", 2, "take"), "");
  ASSERT_EQ(make_varied_clips(dir.path() / "more", 1, "extra"), "");
  write_text(dir.path() / "more" / "list.jsonl",
             "{\"path\": \"extra_0.mp4\", \"id\": \"e-0\", \"prompt_id\": \"harbour-dawn\", "
             "\"model\": \"ckpt-12\", "
             "\"seed\": 1234, \"guidance\": 6.5}\n");
  const auto result =
      clipwarden_cli({"gate", dir.file("batch"), dir.file("more/list.jsonl"), "--out",
                     dir.file("out"), "--width", "160", "--quiet", "--no-html"});
  ASSERT_TRUE(result.exit_code == 0 || result.exit_code == 1) << result.err;
  const auto queue = queue_of(dir.path() / "out");
  ASSERT_EQ(queue.size(), 3u);
  EXPECT_EQ(queue[0]["path"], (dir.path() / "batch" / "day 1" / "take_0.mp4").string());
  EXPECT_EQ(queue[1]["path"], (dir.path() / "batch" / "day 1" / "take_1.mp4").string());
  EXPECT_EQ(queue[2]["id"], "e-0");
  EXPECT_EQ(queue[2]["prompt_id"], "harbour-dawn");
  EXPECT_EQ(queue[2]["model"], "ckpt-12");
  EXPECT_EQ(queue[2]["seed"], 1234);
  EXPECT_EQ(queue[2]["metadata"]["guidance"], 6.5);
  for (const auto& line : queue) EXPECT_NE(line["verdict"], "error") << line.dump();
}

TEST(GateCli, UsageErrorsExitTwoAndNameTheCulprit) {
  TempDir dir;
  write_text(dir.path() / "m.jsonl", "{\"path\": \"a.mp4\"}\n{\"path\": \"b.mp4\",}\n");
  auto r = clipwarden_cli({"gate", dir.file("m.jsonl"), "--out", dir.file("out")});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_NE(r.err.find(dir.file("m.jsonl") + ":2"), std::string::npos) << r.err;
  EXPECT_FALSE(fs::exists(dir.path() / "out" / "queue.jsonl"));  // nothing ran

  write_text(dir.path() / "m.jsonl", "{\"id\": \"a\"}\n");
  r = clipwarden_cli({"gate", dir.file("m.jsonl"), "--out", dir.file("out")});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_NE(r.err.find("missing \"path\""), std::string::npos) << r.err;

  write_text(dir.path() / "p.json",
             "{\"metrics\": {\"flicker\": {\"segment\": {\"enter\": -0.5}}}}");
  r = clipwarden_cli({"gate", "x.mp4", "--out", dir.file("out"), "--policy", dir.file("p.json")});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_NE(r.err.find("metrics.flicker.segment.enter"), std::string::npos) << r.err;

  write_text(dir.path() / "p.json",
             "{\"metrics\": {\"flicker\": {\"thresholds\": {\"p95\": {\"review\": 0.9}}}}}");
  r = clipwarden_cli({"gate", "x.mp4", "--out", dir.file("out"), "--policy", dir.file("p.json")});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_NE(r.err.find("metrics.flicker.thresholds.p95.review"), std::string::npos) << r.err;

  EXPECT_EQ(clipwarden_cli({"gate", "x.mp4", "--out", dir.file("out"), "--shard", "3/3"}).exit_code,
            2);
  EXPECT_EQ(
      clipwarden_cli({"gate", "x.mp4", "--out", dir.file("out"), "--fail-on", "maybe"}).exit_code,
      2);
  EXPECT_EQ(clipwarden_cli({"gate", "x.mp4"}).exit_code, 2);  // no --out
  EXPECT_EQ(clipwarden_cli({"merge", dir.file("nowhere"), "--out", dir.file("m")}).exit_code, 2);
}

TEST(GateCli, PrintedDefaultPolicyIsAcceptedBackUnchanged) {
  TempDir dir;
  const auto printed = clipwarden_cli({"gate", "--print-default-policy"});
  ASSERT_EQ(printed.exit_code, 0) << printed.err;
  EXPECT_EQ(nlohmann::ordered_json::parse(printed.out), policy_to_json(default_policy()));
  write_text(dir.path() / "policy.json", printed.out);
  // Accepted: the run goes on to the (missing) clip, exit 3, not 2.
  const auto r = clipwarden_cli({"gate", dir.file("missing.mp4"), "--out", dir.file("out"),
                                "--policy", dir.file("policy.json"), "--quiet"});
  EXPECT_EQ(r.exit_code, 3) << r.err;
  auto back = load_policy(dir.file("policy.json"));
  ASSERT_TRUE(back.ok()) << back.error().message();
  EXPECT_EQ(policy_to_json(*back).dump(2) + "\n", printed.out);
}
