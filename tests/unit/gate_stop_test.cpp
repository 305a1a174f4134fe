// Stopping a batch (docs/cli.md, exit statuses): GateOptions::stop, set by the CLI's SIGINT and
// SIGTERM handlers, starts no new clip; clips in flight get stop_grace_s and
// are then abandoned. Either way the queue holds exactly the finished clips,
// the store one row per finished clip, a shard's record stays unfinished
// until a rerun finishes the batch. A stand-in analysis (as in
// gate_run_test.cpp) keeps the timing under control.
#include <gtest/gtest.h>

#include <atomic>
#include <chrono>
#include <filesystem>
#include <memory>
#include <thread>

#include "clipwarden/gate.h"
#include "analyzer/store/result_store.h"
#include "support/clips.h"
#include "support/gate_files.h"
#include "support/gate_fixtures.h"

using namespace clipwarden;
using namespace clipwarden::test;
namespace fs = std::filesystem;

namespace {

// Shared with the workers by value: an abandoned worker outlives the test body.
struct StopScript {
  std::atomic<bool> stop{false};
  std::atomic<int> calls{0};
  std::atomic<int> returned{0};
  int stop_on_call = 0;        // sets `stop` during this call (1-based)
  double sleep_on_stop_s = 0;  // then keeps that clip in flight this long
};

AnalyzeFunction scripted(std::shared_ptr<StopScript> s) {
  return [s](const std::string& path, const AnalysisSettings&, const Policy&,
             const AnalysisHooks&) -> Expected<Report> {
    if (++s->calls == s->stop_on_call) {
      s->stop = true;
      std::this_thread::sleep_for(std::chrono::duration<double>(s->sleep_on_stop_s));
    }
    ++s->returned;
    return fixtures::gate_report(12, 12, path);
  };
}

std::vector<GateInput> clips(const fs::path& dir, int n) {
  std::vector<GateInput> inputs;
  for (int i = 0; i < n; ++i) {
    GateInput in;
    in.index = i;
    in.path = (dir / ("c" + std::to_string(i) + ".mp4")).string();
    in.id = in.path;
    in.output_name = "c" + std::to_string(i);
    write_text(in.path, "clip " + std::to_string(i));
    inputs.push_back(in);
  }
  return inputs;
}

size_t rows_in(const fs::path& db) {
  auto store = ResultStore::open(db.string());
  auto rows = store ? (*store)->all() : Expected<std::vector<StoredAnalysis>>(store.error());
  return rows ? rows->size() : 0;
}

}  // namespace

TEST(GateStop, NoClipStartsAfterTheStopAndARerunFinishes) {
  TempDir dir;
  const auto inputs = clips(dir.path() / "clips", 6);
  auto script = std::make_shared<StopScript>();
  script->stop_on_call = 2;
  GateOptions o;
  o.out_dir = dir.file("out");
  o.jobs = 1;
  o.analyze = scripted(script);
  o.stop = &script->stop;
  o.shard = shard_record(inputs, {0, 1});  // as with --shard 0/1: a stopped shard says so
  auto run = run_gate(inputs, o);
  ASSERT_TRUE(run.ok()) << run.error().message();
  EXPECT_TRUE(run->stopped);
  EXPECT_EQ(run->counts.total, 2);  // the clip in flight finished within the grace time
  auto record = read_shard_record(o.out_dir);
  ASSERT_TRUE(record && *record);
  EXPECT_FALSE((*record)->finished);
  const auto refused = check_shard_set({o.out_dir});
  ASSERT_FALSE(refused.ok());
  EXPECT_NE(refused.error().message().find("shard 0 of 1 did not finish (2 of its 6 clips"),
            std::string::npos)
      << refused.error().message();
  EXPECT_EQ(run->abandoned, 0);
  EXPECT_EQ(run->not_started, 4);
  EXPECT_EQ(read_lines(dir.path() / "out" / "queue.jsonl").size(), 2u);
  EXPECT_EQ(rows_in(dir.path() / "out" / "clipwarden.db"), 2u);

  script->stop = false;
  script->stop_on_call = 0;
  auto rerun = run_gate(inputs, o);
  ASSERT_TRUE(rerun.ok());
  EXPECT_FALSE(rerun->stopped);
  EXPECT_EQ(rerun->counts.total, 6);
  EXPECT_EQ(rerun->counts.from_store, 2);
  EXPECT_EQ(read_lines(dir.path() / "out" / "queue.jsonl").size(), 6u);
  EXPECT_EQ(rows_in(dir.path() / "out" / "clipwarden.db"), 6u);
  record = read_shard_record(o.out_dir);
  ASSERT_TRUE(record && *record);
  EXPECT_TRUE((*record)->finished);
  EXPECT_TRUE(check_shard_set({o.out_dir}).ok());
}

TEST(GateStop, ClipStillInFlightAfterTheGraceTimeIsAbandoned) {
  TempDir dir;
  const auto inputs = clips(dir.path() / "clips", 4);
  auto script = std::make_shared<StopScript>();
  script->stop_on_call = 2;
  script->sleep_on_stop_s = 1.5;
  GateOptions o;
  o.out_dir = dir.file("out");
  o.jobs = 1;
  o.analyze = scripted(script);
  o.stop = &script->stop;
  o.stop_grace_s = 0.1;
  const auto start = std::chrono::steady_clock::now();
  auto run = run_gate(inputs, o);
  const double took_s =
      std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  ASSERT_TRUE(run.ok()) << run.error().message();
  EXPECT_LT(took_s, 1.2) << "run_gate waited for the abandoned clip";
  EXPECT_TRUE(run->stopped);
  EXPECT_EQ(run->counts.total, 1);
  EXPECT_EQ(run->abandoned, 1);
  EXPECT_EQ(run->not_started, 2);
  EXPECT_EQ(read_lines(dir.path() / "out" / "queue.jsonl").size(), 1u);
  // The abandoned worker finishes on its own; its result never reaches the
  // queue (written already), though its store row may.
  while (script->returned < 2) std::this_thread::sleep_for(std::chrono::milliseconds(20));
  std::this_thread::sleep_for(std::chrono::milliseconds(200));
  EXPECT_EQ(read_lines(dir.path() / "out" / "queue.jsonl").size(), 1u);
  EXPECT_LE(rows_in(dir.path() / "out" / "clipwarden.db"), 2u);
}
