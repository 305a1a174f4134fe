// Hostile names and files through the built CLI, each with a time limit:
// a clip whose file name is not UTF-8 (Linux names are bytes) is judged and
// its name kept byte for byte in every output, and the rest of the batch is
// judged too; a device or a named pipe given as a clip (directly or in a
// manifest) is refused at once by every command, never read until it ends;
// a policy or manifest nested 60,000 levels deep is a usage error, not a
// crash. Clips come from FFmpeg's lavfi testsrc2.
#include <gtest/gtest.h>
#include <sys/stat.h>
#include <unistd.h>

#include <filesystem>

#include "analyzer/core/byte_text.h"
#include "analyzer/gate/folder_lock.h"
#include "clipwarden/gate.h"
#include "clipwarden/report_io.h"
#include "support/clips.h"
#include "support/gate_files.h"
#include "support/robust_run.h"

using namespace clipwarden;
using namespace clipwarden::test;
namespace fs = std::filesystem;
using nlohmann::json;

namespace {

constexpr double kLimitS = 120;

BoundedRun cli(std::vector<std::string> args, const fs::path& logs) {
  args.insert(args.begin(), CLIPWARDEN_BINARY);
  return run_bounded(args, logs, kLimitS);
}

std::vector<json> queue_of(const fs::path& out) {
  std::vector<json> lines;
  for (const auto& l : read_lines(out / "queue.jsonl")) lines.push_back(json::parse(l));
  return lines;
}

std::string nested(int levels) {
  std::string text;
  for (int i = 0; i < levels; ++i) text += "{\"a\":";
  return text + "{}" + std::string(static_cast<size_t>(levels), '}');
}

}  // namespace

TEST(BadNamesAndFiles, NameThatIsNotUtf8IsJudgedAndKeptByteForByte) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const fs::path clips = dir.path() / "clips";
  ASSERT_EQ(make_varied_clips(clips, 3), "");
  const std::string odd = (clips / "take_\xff_caf\xe9.mp4").string();  // 0xFF, Latin-1 é
  fs::rename(clips / "clip_1.mp4", odd);

  const fs::path out = dir.path() / "gate";
  auto run = cli({"gate", clips.string(), "--out", out.string(), "--jobs", "1", "--quiet"},
                 dir.path() / "logs" / "gate");
  ASSERT_FALSE(run.timed_out);
  ASSERT_EQ(run.signal, 0) << run.err;
  ASSERT_TRUE(run.exit_code == 0 || run.exit_code == 1) << run.outcome() << "\n" << run.err;
  const auto lines = queue_of(out);
  ASSERT_EQ(lines.size(), 3u) << "every clip of the batch has its line";
  int escaped = 0;
  for (const auto& line : lines) {
    EXPECT_NE(line["verdict"], "error") << line.dump();
    const auto path = get_bytes_field(line, "path");
    ASSERT_TRUE(path) << line.dump();
    EXPECT_TRUE(fs::exists(*path)) << "the queue's path names the real file: " << line.dump();
    if (line.contains("path_escaped")) {
      ++escaped;
      EXPECT_EQ(*path, odd);
      EXPECT_EQ(line["path"], printable(odd));
      auto report = read_report_file((out / line["report"].get<std::string>()).string());
      ASSERT_TRUE(report) << report.error().message();
      EXPECT_EQ(report->clip.path, odd);
    }
  }
  EXPECT_EQ(escaped, 1);
  // The queue page shows the name escaped, as readable text.
  EXPECT_NE(read_text(out / "index.html").find("take_\\xff_caf\\xe9"), std::string::npos);

  // merge reads the escaped queue back without losing a byte.
  const fs::path merged = dir.path() / "merged";
  // Its exit status reports the verdicts as gate's does (docs/gate.md: 1 when
  // a clip reached --fail-on), which this test does not judge.
  run = cli({"merge", out.string(), "--out", merged.string()}, dir.path() / "logs" / "merge");
  ASSERT_TRUE(run.exit_code == 0 || run.exit_code == 1) << run.outcome() << "\n" << run.err;
  bool found = false;
  for (const auto& line : queue_of(merged)) found = found || get_bytes_field(line, "path") == odd;
  EXPECT_TRUE(found);

  // analyze and probe take the same name.
  run = cli({"analyze", odd, "--out", (dir.path() / "analyze").string(), "--quiet"},
            dir.path() / "logs" / "analyze");
  ASSERT_TRUE(run.exit_code == 0 || run.exit_code == 1) << run.outcome() << "\n" << run.err;
  run = cli({"probe", odd}, dir.path() / "logs" / "probe");
  ASSERT_EQ(run.exit_code, 0) << run.outcome() << "\n" << run.err;
  const json probed = json::parse(run.out);
  EXPECT_EQ(get_bytes_field(probed, "path"), odd);
}

TEST(BadNamesAndFiles, DevicesAndPipesAreRefusedAtOnceEverywhere) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  ASSERT_EQ(make_varied_clips(dir.path() / "clips", 1), "");
  const std::string good = (dir.path() / "clips" / "clip_0.mp4").string();
  const std::string fifo = dir.file("pipe.mp4");
  ASSERT_EQ(::mkfifo(fifo.c_str(), 0644), 0);
  const fs::path manifest = dir.path() / "list.jsonl";
  write_text(manifest, "{\"path\": \"/dev/zero\", \"id\": \"zero-from-manifest\"}\n{\"path\": \"" +
                           fifo + "\", \"id\": \"pipe-from-manifest\"}\n");

  const fs::path out = dir.path() / "gate";
  auto run =
      cli({"gate", "/dev/zero", fifo, good, manifest.string(), "--out", out.string(), "--quiet"},
          dir.path() / "logs" / "gate");
  ASSERT_FALSE(run.timed_out) << "the gate hung on a device or a pipe";
  ASSERT_EQ(run.signal, 0) << run.err;
  EXPECT_EQ(run.exit_code, 3) << run.err;
  const auto lines = queue_of(out);
  ASSERT_EQ(lines.size(), 5u);
  int refused = 0;
  for (const auto& line : lines) {
    if (line["path"] == good) {
      EXPECT_NE(line["verdict"], "error") << line.dump();
      continue;
    }
    EXPECT_EQ(line["verdict"], "error") << line.dump();
    EXPECT_NE(line["error"].get<std::string>().find("not a regular file or a folder of frames"),
              std::string::npos)
        << line.dump();
    ++refused;
  }
  EXPECT_EQ(refused, 4);

  int n = 0;
  for (const std::string& bad : {std::string("/dev/zero"), fifo}) {
    for (const std::string& command : {std::string("analyze"), std::string("probe")}) {
      std::vector<std::string> args = {command, bad};
      if (command == "analyze") args.insert(args.end(), {"--out", dir.file("a"), "--quiet"});
      run = cli(args, dir.path() / "logs" / (command + std::to_string(++n)));
      ASSERT_FALSE(run.timed_out) << command << " " << bad;
      EXPECT_EQ(run.exit_code, 3) << command << " " << bad << ": " << run.err;
      EXPECT_NE(run.err.find("not a regular file or a folder of frames"), std::string::npos)
          << run.err;
    }
  }
}

TEST(BadNamesAndFiles, DeeplyNestedPolicyAndManifestAreUsageErrors) {
  TempDir dir;
  const fs::path policy = dir.path() / "deep_policy.json";
  write_text(policy, nested(60000));
  const fs::path manifest = dir.path() / "deep.jsonl";
  write_text(manifest, "{\"path\": \"a.mp4\", \"note\": " + nested(60000) + "}\n");
  int n = 0;
  for (const auto& args : std::vector<std::vector<std::string>>{
           {"gate", "x.mp4", "--out", dir.file("g1"), "--policy", policy.string()},
           {"analyze", "x.mp4", "--out", dir.file("a1"), "--policy", policy.string()},
           {"gate", manifest.string(), "--out", dir.file("g2")}}) {
    auto run = cli(args, dir.path() / "logs" / std::to_string(++n));
    ASSERT_EQ(run.signal, 0) << args[0] << ": " << run.err;
    EXPECT_EQ(run.exit_code, 2) << args[0] << ": " << run.err;
    EXPECT_NE(run.err.find("nests deeper than 64 levels"), std::string::npos) << run.err;
  }
}

// A second writer of one output folder is refused at once with exit status
// 2, naming the holder; the holder here is this test process, so nothing
// depends on timing. Once the lock is released the same command runs.
TEST(BadNamesAndFiles, OutputFolderHasOneWriterAtATime) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  ASSERT_EQ(make_varied_clips(dir.path() / "clips", 1), "");
  const fs::path out = dir.path() / "out";
  fs::create_directories(out);
  const std::vector<std::string> gate = {"gate", (dir.path() / "clips").string(), "--out",
                                         out.string(), "--quiet"};
  {
    auto held = FolderLock::take(out.string());
    ASSERT_TRUE(held) << held.error().message();
    auto run = cli(gate, dir.path() / "logs" / "second");
    EXPECT_EQ(run.exit_code, 2) << run.err;
    EXPECT_NE(run.err.find("is being written by another clipwarden (pid " +
                           std::to_string(::getpid()) + " on "),
              std::string::npos)
        << run.err;
    EXPECT_FALSE(fs::exists(out / "queue.jsonl")) << "the refused gate wrote nothing";
  }
  auto run = cli(gate, dir.path() / "logs" / "after");
  EXPECT_TRUE(run.exit_code == 0 || run.exit_code == 1) << run.err;
  EXPECT_EQ(queue_of(out).size(), 1u);
}

// A CI job must not pass having checked nothing: an empty folder or an empty
// manifest is a usage error unless --allow-empty says it is expected.
TEST(BadNamesAndFiles, EmptyInputIsAnErrorUnlessAllowed) {
  TempDir dir;
  fs::create_directories(dir.path() / "empty");
  write_text(dir.path() / "empty.jsonl", "\n");
  for (const std::string& input : {dir.file("empty"), dir.file("empty.jsonl")}) {
    auto run = cli({"gate", input, "--out", dir.file("out")}, dir.path() / "logs" / "refused");
    EXPECT_EQ(run.exit_code, 2) << input << ": " << run.err;
    EXPECT_NE(run.err.find("the inputs hold no clips (--allow-empty"), std::string::npos)
        << run.err;
  }
  auto run = cli({"gate", dir.file("empty"), "--out", dir.file("out"), "--allow-empty", "--quiet"},
                 dir.path() / "logs" / "allowed");
  EXPECT_EQ(run.exit_code, 0) << run.err;
  EXPECT_TRUE(fs::exists(dir.path() / "out" / "queue.jsonl"));
  EXPECT_TRUE(queue_of(dir.path() / "out").empty());
}

// --db /dev/null is refused before SQLite opens it, so no journal file is
// left beside it.
TEST(BadNamesAndFiles, StoreThatIsNotARegularFileIsRefused) {
  TempDir dir;
  std::error_code ec;
  std::vector<std::string> absent;  // journals that are not there before
  for (const char* journal : {"/dev/null-wal", "/dev/null-shm", "/dev/null-journal"})
    if (!fs::exists(journal, ec)) absent.push_back(journal);
  auto run = cli({"gate", dir.file("x.mp4"), "--out", dir.file("out"), "--db", "/dev/null"},
                 dir.path() / "logs" / "db");
  EXPECT_EQ(run.exit_code, 2) << run.err;
  EXPECT_NE(run.err.find("/dev/null: the results store must be a regular file"), std::string::npos)
      << run.err;
  for (const auto& journal : absent) EXPECT_FALSE(fs::exists(journal, ec)) << journal;
}

// A damaged store: the message says how to get going again, and the output
// folder the run would have made is not left behind empty.
TEST(BadNamesAndFiles, DamagedStoreSaysWhatToDoAndLeavesNoEmptyFolder) {
  TempDir dir;
  write_text(dir.path() / "damaged.db", std::string(4096, 'x'));
  auto run =
      cli({"gate", dir.file("x.mp4"), "--out", dir.file("out"), "--db", dir.file("damaged.db")},
          dir.path() / "logs" / "db");
  EXPECT_NE(run.exit_code, 0);
  EXPECT_NE(run.err.find("results store is damaged"), std::string::npos) << run.err;
  EXPECT_NE(run.err.find("or point --db at another file"), std::string::npos) << run.err;
  EXPECT_FALSE(fs::exists(dir.path() / "out")) << "an empty output folder was left behind";
}

// --jobs far beyond the cores is capped, and said.
TEST(BadNamesAndFiles, JobsAreCappedWithAWarning) {
  TempDir dir;
  auto run =
      cli({"gate", dir.file("missing.mp4"), "--out", dir.file("out"), "--jobs", "1000", "--quiet"},
          dir.path() / "logs" / "jobs");
  EXPECT_EQ(run.exit_code, 3) << run.err;  // the clip is missing; the run itself is fine
  EXPECT_NE(run.err.find("--jobs 1000 is more than twice the"), std::string::npos) << run.err;
}
