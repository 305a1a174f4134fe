// Resuming a killed batch (docs/gate.md): a real `clipwarden gate` child is killed
// with SIGKILL once the results store holds at least one clip; running the
// same command again finishes the rest. No clip may be lost or counted
// twice: the queue has every clip once, the store one row per clip, and
// exactly the clips stored before the kill come from the store.
#include <gtest/gtest.h>
#include <signal.h>
#include <sys/wait.h>

#include <chrono>
#include <filesystem>
#include <set>
#include <thread>

#include "analyzer/store/result_store.h"
#include "support/clips.h"
#include "support/gate_files.h"

using namespace clipwarden;
using namespace clipwarden::test;
namespace fs = std::filesystem;

namespace {

// Rows in the store, or 0 while it does not exist yet. Opening it from here
// while the child writes is what WAL mode allows.
size_t stored_rows(const fs::path& db) {
  std::error_code ec;
  if (!fs::exists(db, ec)) return 0;
  auto store = ResultStore::open(db.string());
  if (!store) return 0;
  auto rows = (*store)->all();
  return rows ? rows->size() : 0;
}

}  // namespace

TEST(GateResume, KilledBatchFinishesOnRerunWithoutLosingOrRepeatingClips) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  constexpr int kClips = 10;
  ASSERT_EQ(make_varied_clips(dir.path() / "clips", kClips), "");
  const fs::path out = dir.path() / "out", db = out / "clipwarden.db";
  const std::vector<std::string> command = {
      CLIPWARDEN_BINARY, "gate", dir.file("clips"), "--out", out.string(), "--jobs", "1",
      "--threads",      "1",    "--width",         "160",   "--no-html"};

  // First run: kill -9 as soon as one clip is stored (one clip at a time, so
  // the others are still to do). Give up waiting after two minutes.
  const int pid = start_program(command, dir.path() / "run1");
  ASSERT_GT(pid, 0);
  const auto deadline = std::chrono::steady_clock::now() + std::chrono::minutes(2);
  bool exited_by_itself = false;
  while (stored_rows(db) < 1 && std::chrono::steady_clock::now() < deadline) {
    int status = 0;
    if (waitpid(pid, &status, WNOHANG) == pid) {
      exited_by_itself = true;
      break;
    }
    std::this_thread::sleep_for(std::chrono::milliseconds(20));
  }
  if (!exited_by_itself) {
    ASSERT_EQ(kill(pid, SIGKILL), 0);
    EXPECT_EQ(wait_program(pid), -1);  // died by the signal
  }
  ASSERT_FALSE(exited_by_itself) << "the first run finished before it could be killed: "
                                 << read_text(dir.path() / "run1" / "stderr");
  const size_t stored_before = stored_rows(db);
  ASSERT_GE(stored_before, 1u);
  ASSERT_LT(stored_before, static_cast<size_t>(kClips)) << "every clip was done before the kill";
  // Whatever queue the killed run left is whole lines of finished clips.
  for (const auto& line : read_lines(out / "queue.jsonl")) {
    auto j = nlohmann::json::parse(line, nullptr, false);
    ASSERT_FALSE(j.is_discarded()) << line;
    EXPECT_NE(j["verdict"], "error") << line;
  }

  // Second run: the same command.
  const auto second = run_command(command);
  ASSERT_TRUE(second.exit_code == 0 || second.exit_code == 1) << second.err;
  EXPECT_NE(second.out.find("(" + std::to_string(stored_before) + " taken from the store)"),
            std::string::npos)
      << second.out;
  const auto lines = read_lines(out / "queue.jsonl");
  ASSERT_EQ(lines.size(), static_cast<size_t>(kClips));
  std::set<std::string> ids;
  size_t from_store = 0;
  for (size_t i = 0; i < lines.size(); ++i) {
    const auto j = nlohmann::json::parse(lines[i]);
    EXPECT_EQ(j["index"], i);
    EXPECT_NE(j["verdict"], "error") << lines[i];
    EXPECT_TRUE(fs::exists(out / j["report"].get<std::string>())) << lines[i];
    ids.insert(j["id"].get<std::string>());
    if (j["from_store"].get<bool>()) ++from_store;
  }
  EXPECT_EQ(ids.size(), static_cast<size_t>(kClips));
  EXPECT_EQ(from_store, stored_before);
  EXPECT_EQ(stored_rows(db), static_cast<size_t>(kClips));  // one row per clip, none twice

  // A third run recomputes nothing.
  const auto third = run_command(command);
  EXPECT_NE(third.out.find("(" + std::to_string(kClips) + " taken from the store)"),
            std::string::npos)
      << third.out;
  EXPECT_EQ(stored_rows(db), static_cast<size_t>(kClips));
}

// A clip taken from the store gets the same report and page bytes as when it
// was analysed: the stored JSON lists its series by name, the page orders
// them as the analysis does (a cluster's requeued shard relies on this).
TEST(GateResume, StoreHitWritesTheSameReportAndPage) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  ASSERT_EQ(make_varied_clips(dir.path() / "clips", 2), "");
  auto gate = [&] {
    const auto r = run_command({CLIPWARDEN_BINARY, "gate", dir.file("clips"), "--out",
                                dir.file("out"), "--width", "160", "--jobs", "2", "--quiet"});
    EXPECT_TRUE(r.exit_code == 0 || r.exit_code == 1) << r.err;
  };
  gate();
  std::vector<std::pair<fs::path, std::string>> analysed;
  for (const char* name : {"clip_0.json", "clip_0.html", "clip_1.json", "clip_1.html"})
    analysed.emplace_back(dir.path() / "out" / name, read_text(dir.path() / "out" / name));
  gate();
  for (const auto& line : read_lines(dir.path() / "out" / "queue.jsonl"))
    EXPECT_NE(line.find("\"from_store\":true"), std::string::npos) << line;
  for (const auto& [path, text] : analysed)
    EXPECT_TRUE(read_text(path) == text) << path << " changed when taken from the store";
}
