// Crash safety of `clipwarden gate` (docs/cli.md): a batch of 8 short clips
// (--jobs 2) is interrupted at pseudo-random points (fixed seed, spread over
// a measured uninterrupted run) with SIGKILL three times in a row, and once
// each with SIGINT and SIGTERM; then the same command runs to completion.
// After every interruption: whatever queue exists is whole lines, each clip
// at most once, every JSON report parses (reports are renamed into place
// whole). After the final run: every clip exactly once in the queue and in
// the store, the verdicts of an uninterrupted run, no temporary files left.
// SIGINT/SIGTERM must exit within the grace time plus slack with status
// 128+signal (130, 143: documented in `clipwarden gate --help`).
#include <gtest/gtest.h>
#include <signal.h>
#include <sys/wait.h>

#include <chrono>
#include <filesystem>
#include <iostream>
#include <map>
#include <random>
#include <set>
#include <thread>

#include "analyzer/store/result_store.h"
#include "support/clips.h"
#include "support/gate_files.h"
#include "support/robust_run.h"

using namespace clipwarden;
using namespace clipwarden::test;
namespace fs = std::filesystem;
using nlohmann::json;
using Clock = std::chrono::steady_clock;

namespace {

constexpr int kClips = 8;
// The CLI's grace time for clips in flight (5 s) plus slack for a loaded CI.
constexpr double kPromptExitS = 12;

std::vector<std::string> gate_command(const fs::path& clips, const fs::path& out) {
  return {CLIPWARDEN_BINARY, "gate", clips.string(), "--out", out.string(), "--jobs", "2",
          "--threads",      "1",    "--width",      "160"};
}

// clip id -> verdict, for every queue line; fails on a broken line or a
// clip named twice.
std::map<std::string, std::string> queue_verdicts(const fs::path& out) {
  std::map<std::string, std::string> verdicts;
  for (const auto& line : read_lines(out / "queue.jsonl")) {
    const json j = json::parse(line, nullptr, false);
    EXPECT_FALSE(j.is_discarded()) << "half a queue line: " << line;
    if (j.is_discarded()) continue;
    const std::string id = j["id"].get<std::string>();
    EXPECT_EQ(verdicts.count(id), 0u) << id << " twice in the queue";
    verdicts[id] = j["verdict"].get<std::string>();
    EXPECT_NE(verdicts[id], "error") << line;
    if (j["report"].is_string() && !j["report"].get<std::string>().empty())
      EXPECT_TRUE(fs::exists(out / j["report"].get<std::string>())) << line;
  }
  return verdicts;
}

// Every visible report is whole; returns the hidden temporaries found.
int check_files_whole(const fs::path& out) {
  int temporaries = 0;
  std::error_code ec;
  for (const auto& e : fs::directory_iterator(out, ec)) {
    const std::string name = e.path().filename().string();
    if (name.rfind(".tmp-", 0) == 0) {
      ++temporaries;
      continue;
    }
    if (e.path().extension() == ".json")
      EXPECT_FALSE(json::parse(read_text(e.path()), nullptr, false).is_discarded())
          << "half-written report " << name;
    if (e.path().extension() == ".html")
      EXPECT_NE(read_text(e.path()).rfind("</html>"), std::string::npos)
          << "half-written page " << name;
  }
  return temporaries;
}

size_t store_rows(const fs::path& db) {
  auto store = ResultStore::open(db.string());
  if (!store) return 0;
  auto rows = (*store)->all();
  if (!rows) return 0;
  std::set<std::string> clips;
  for (const auto& r : *rows)
    EXPECT_TRUE(clips.insert(r.clip_path).second) << r.clip_path << " twice";
  return rows->size();
}

// Starts the command, sends `sig` after `after_s`, waits (bounded). Returns
// the exit description and the seconds from the signal to the exit.
struct Interrupted {
  BoundedRun run;
  bool signalled = false;  // false when the run ended before the signal
  double exit_after_signal_s = 0;
};

// When `ready` is given, `after_s` counts from the moment it exists: gate
// installs its signal handlers before it writes anything, so a handled
// signal sent after that cannot land during start-up (loading OpenCV's
// libraries can take longer than the whole batch on a loaded machine, and
// a signal then kills the process like any program's).
Interrupted interrupt(const std::vector<std::string>& command, const fs::path& logs, int sig,
                      double after_s, const fs::path& ready = {}) {
  Interrupted r;
  // A marker that exists before launch says nothing about the program: the
  // signal would land during start-up. start_program creates `logs`, so it
  // must not be (or hold) the marker either.
  EXPECT_FALSE(!ready.empty() && fs::exists(ready)) << ready << " exists before launch";
  EXPECT_NE(ready, logs) << "the readiness marker is the log folder";
  if (!ready.empty() && (fs::exists(ready) || ready == logs)) return r;
  const int pid = start_program(command, logs);
  EXPECT_GT(pid, 0);
  if (pid <= 0) return r;
  int status = 0;
  bool ended = false;
  const auto launched = Clock::now();
  while (!ready.empty() && !ended && !fs::exists(ready) &&
         std::chrono::duration<double>(Clock::now() - launched).count() < 60) {
    ended = waitpid(pid, &status, WNOHANG) == pid;
    if (!ended) std::this_thread::sleep_for(std::chrono::milliseconds(2));
  }
  const auto start = Clock::now();
  while (!ended && std::chrono::duration<double>(Clock::now() - start).count() < after_s) {
    ended = waitpid(pid, &status, WNOHANG) == pid;
    if (!ended) std::this_thread::sleep_for(std::chrono::milliseconds(10));
  }
  Clock::time_point signalled_at = Clock::now();
  if (!ended) {
    kill(pid, sig);
    r.signalled = true;
    while (!(ended = waitpid(pid, &status, WNOHANG) == pid)) {
      if (std::chrono::duration<double>(Clock::now() - signalled_at).count() > 60) {
        kill(pid, SIGKILL);
        waitpid(pid, &status, 0);
        r.run.timed_out = true;
        break;
      }
      std::this_thread::sleep_for(std::chrono::milliseconds(10));
    }
  }
  r.exit_after_signal_s = std::chrono::duration<double>(Clock::now() - signalled_at).count();
  if (WIFEXITED(status)) r.run.exit_code = WEXITSTATUS(status);
  if (WIFSIGNALED(status)) r.run.signal = WTERMSIG(status);
  // It may have exited between the last look and the kill (a zombie takes
  // the signal without effect): it finished before the signal landed.
  if (WIFEXITED(status) && (sig == SIGKILL || WEXITSTATUS(status) < 128)) r.signalled = false;
  r.run.err = read_text(logs / "stderr");
  return r;
}

class GateSignals : public ::testing::Test {
 protected:
  void SetUp() override {
    CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
    ASSERT_EQ(make_varied_clips(dir_.path() / "clips", kClips), "");
    // An uninterrupted run: its length places the signals, its verdicts are
    // what every interrupted-then-resumed batch must end with.
    const auto start = Clock::now();
    const auto whole = run_command(gate_command(dir_.path() / "clips", dir_.path() / "whole"));
    whole_s_ = std::chrono::duration<double>(Clock::now() - start).count();
    ASSERT_TRUE(whole.exit_code == 0 || whole.exit_code == 1) << whole.err;
    expected_ = queue_verdicts(dir_.path() / "whole");
    ASSERT_EQ(expected_.size(), static_cast<size_t>(kClips));
  }

  // The final, uninterrupted rerun and the checks on what it leaves.
  void finish_and_check(const fs::path& out, const std::string& label) {
    const auto rerun = run_command(gate_command(dir_.path() / "clips", out));
    EXPECT_TRUE(rerun.exit_code == 0 || rerun.exit_code == 1) << label << ": " << rerun.err;
    EXPECT_EQ(queue_verdicts(out), expected_) << label;
    EXPECT_EQ(store_rows(out / "clipwarden.db"), static_cast<size_t>(kClips)) << label;
    EXPECT_EQ(check_files_whole(out), 0) << label << ": temporary files left after the rerun";
  }

  TempDir dir_;
  double whole_s_ = 0;
  std::map<std::string, std::string> expected_;
};

}  // namespace

TEST_F(GateSignals, RepeatedSigkillThenRerunLosesAndRepeatsNothing) {
  const fs::path out = dir_.path() / "killed";
  std::mt19937 rng(20261202);
  std::uniform_real_distribution<double> fraction(0.1, 0.9);
  std::string times;
  int landed = 0;
  for (int k = 0; k < 3; ++k) {
    // Later runs resume from the store and are shorter: earlier kills.
    double at_s = fraction(rng) * whole_s_ * (k == 0 ? 1.0 : 0.5);
    const fs::path logs = dir_.path() / ("kill" + std::to_string(k));
    // SIGKILL needs no handler, so only the first batch waits for gate's
    // output folder (to kill it mid-batch, not during start-up); resumed
    // batches find that folder already there and count from launch.
    const fs::path ready = k == 0 ? out : fs::path{};
    auto r = interrupt(gate_command(dir_.path() / "clips", out), logs, SIGKILL, at_s, ready);
    // The first batch must be cut mid-way for the test to mean anything; if
    // it finished first (the load changed since the timed run), start it
    // again in a fresh folder with an earlier kill.
    for (int retry = 0; k == 0 && retry < 3 && !r.signalled; ++retry) {
      fs::remove_all(out);
      at_s *= 0.4;
      r = interrupt(gate_command(dir_.path() / "clips", out), logs, SIGKILL, at_s, ready);
    }
    times += " " + std::to_string(at_s) + (r.signalled ? "" : " (finished first)");
    if (r.signalled) {
      EXPECT_EQ(r.run.signal, SIGKILL);
      ++landed;
    }
    if (fs::exists(out)) {
      const auto partial = queue_verdicts(out);
      for (const auto& [id, verdict] : partial) EXPECT_EQ(verdict, expected_[id]) << id;
      check_files_whole(out);  // hidden temporaries may remain after SIGKILL
    }
  }
  EXPECT_GE(landed, 1) << "no kill landed mid-batch:" << times;
  RecordProperty("kill_times_s", times);
  std::cout << "uninterrupted run " << whole_s_ << " s; SIGKILL at" << times << " s\n";
  finish_and_check(out, "after SIGKILL");
}

TEST_F(GateSignals, SigintAndSigtermStopPromptlyWithTheirStatusThenRerunFinishes) {
  std::mt19937 rng(7);
  std::uniform_real_distribution<double> fraction(0.2, 0.6);
  for (const int sig : {SIGINT, SIGTERM}) {
    const std::string name = sig == SIGINT ? "SIGINT" : "SIGTERM";
    const fs::path out = dir_.path() / name;
    // The logs have a folder of their own: start_program creates it before
    // launch, so it cannot tell that gate has installed its handlers.
    const fs::path logs = dir_.path() / (name + "-logs");
    double at_s = fraction(rng) * whole_s_;
    auto r = interrupt(gate_command(dir_.path() / "clips", out), logs, sig, at_s, out);
    // The uninterrupted run was timed once; on a machine whose load changes
    // (parallel tests, other builds) a later batch can finish sooner than
    // the fraction chosen. Signal earlier in a fresh folder rather than
    // fail: what is under test is the stop, not the timing.
    for (int retry = 0; retry < 3 && !r.signalled; ++retry) {
      fs::remove_all(out);
      at_s *= 0.4;
      r = interrupt(gate_command(dir_.path() / "clips", out), logs, sig, at_s, out);
    }
    ASSERT_TRUE(r.signalled) << name << ": the batch ended before " << at_s << " s";
    EXPECT_FALSE(r.run.timed_out) << name << ": no exit within 60 s";
    EXPECT_EQ(r.run.signal, 0) << name << " must be handled, not fatal";
    EXPECT_EQ(r.run.exit_code, 128 + sig) << name << ": " << r.run.err;
    EXPECT_LT(r.exit_after_signal_s, kPromptExitS) << name;
    EXPECT_NE(r.run.err.find("stopped by " + name), std::string::npos) << r.run.err;
    const auto partial = queue_verdicts(out);
    EXPECT_LT(partial.size(), static_cast<size_t>(kClips)) << name;
    for (const auto& [id, verdict] : partial) EXPECT_EQ(verdict, expected_[id]) << id;
    // A handled stop that abandoned nothing leaves no temporaries.
    const int temporaries = check_files_whole(out);
    if (r.run.err.find("(0 abandoned") != std::string::npos) EXPECT_EQ(temporaries, 0) << name;
    std::cout << name << " at " << at_s << " s of " << whole_s_ << ": exit " << r.run.exit_code
              << " after " << r.exit_after_signal_s << " s, " << partial.size()
              << " clips in the queue\n";
    finish_and_check(out, "after " + name);
  }
}
