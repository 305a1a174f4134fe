// The gate's batch runner, store reuse, shards and merge (analyzer/gate/),
// with a stand-in analysis so the batch logic is tested on its own: each
// clip file holds the verdict its stand-in report gets. The contract is
// docs/gate.md: queue in input order, errors recorded,
// nothing recomputed that the store holds, shards' union equals one run.
#include <gtest/gtest.h>

#include <atomic>
#include <filesystem>
#include <set>
#include <thread>

#include "analyzer/cli/command.h"
#include "analyzer/cli/gate_output.h"
#include "clipwarden/gate.h"
#include "clipwarden/policy.h"
#include "analyzer/store/result_store.h"
#include "support/clips.h"
#include "support/gate_files.h"
#include "support/gate_fixtures.h"

using namespace clipwarden;
using namespace clipwarden::test;
namespace fs = std::filesystem;

namespace {

// Stand-in analysis: the clip file's first word is the verdict to give
// ("pass", "review", "reject") or "broken" for an unreadable clip.
struct FakeAnalysis {
  std::atomic<int> calls{0};
  AnalyzeFunction function() {
    return [this](const std::string& path, const AnalysisSettings&, const Policy&,
                  const AnalysisHooks&) -> Expected<Report> {
      ++calls;
      const std::string text = read_text(path);
      if (text.rfind("broken", 0) == 0) return input_error(path, "no video stream");
      Report r = fixtures::gate_report(24, 24, path);
      r.summary.coherence = 50 + static_cast<double>(text.size() % 50);
      if (text.rfind("reject", 0) == 0)
        r.verdict = {Verdict::reject, {"flicker p95 0.04 >= reject 0.03 (frame 3, 0.12 s)"}};
      if (text.rfind("review", 0) == 0)
        r.verdict = {Verdict::review, {"cut segment peak 0.7 >= review 0.5 (frame 9, 0.38 s)"}};
      return r;
    };
  }
};

// Clips named clip_<i>.mp4 in `dir` whose verdicts cycle through `kinds`.
std::vector<GateInput> make_clips(const fs::path& dir, int n,
                                  const std::vector<std::string>& kinds) {
  std::vector<GateInput> inputs;
  for (int i = 0; i < n; ++i) {
    GateInput in;
    in.index = i;
    in.path = (dir / ("clip_" + std::to_string(i) + ".mp4")).string();
    in.id = "clip-" + std::to_string(i);
    in.output_name = "clip_" + std::to_string(i);
    in.model = i % 2 ? "ckpt-b" : "ckpt-a";
    write_text(in.path, kinds[i % kinds.size()] + " unique " + std::to_string(i));
    inputs.push_back(in);
  }
  return inputs;
}

GateOptions options_for(const fs::path& out, FakeAnalysis& fake, int jobs = 2) {
  GateOptions o;
  o.out_dir = out.string();
  o.jobs = jobs;
  o.analyze = fake.function();
  return o;
}

size_t store_rows(const fs::path& db) {
  auto store = ResultStore::open(db.string());
  EXPECT_TRUE(store.ok());
  auto rows = (*store)->all();
  return rows.ok() ? rows->size() : 0;
}

std::vector<nlohmann::json> queue_of(const fs::path& out) {
  std::vector<nlohmann::json> lines;
  for (const auto& l : read_lines(out / "queue.jsonl")) lines.push_back(nlohmann::json::parse(l));
  return lines;
}

}  // namespace

TEST(GateRun, QueueInInputOrderWithErrorsRecorded) {
  TempDir dir;
  FakeAnalysis fake;
  auto inputs = make_clips(dir.path() / "clips", 5, {"pass", "reject", "broken", "review", "pass"});
  GateInput missing;
  missing.index = 5;
  missing.path = (dir.path() / "clips" / "gone.mp4").string();
  missing.id = missing.path;
  missing.output_name = "gone";
  inputs.push_back(missing);

  auto run = run_gate(inputs, options_for(dir.path() / "out", fake, 3));
  ASSERT_TRUE(run.ok()) << run.error().message();
  EXPECT_EQ(run->counts.total, 6);
  EXPECT_EQ(run->counts.pass, 2);
  EXPECT_EQ(run->counts.review, 1);
  EXPECT_EQ(run->counts.reject, 1);
  EXPECT_EQ(run->counts.error, 2);
  const auto queue = queue_of(dir.path() / "out");
  ASSERT_EQ(queue.size(), 6u);
  const std::vector<std::string> expected = {"pass", "reject", "error", "review", "pass", "error"};
  for (size_t i = 0; i < queue.size(); ++i) {
    EXPECT_EQ(queue[i]["index"], i);
    EXPECT_EQ(queue[i]["verdict"], expected[i]) << i;
    EXPECT_EQ(queue[i]["from_store"], false);
  }
  EXPECT_EQ(queue[1]["report"], "clip_1.json");
  EXPECT_EQ(queue[1]["reasons"][0], "flicker p95 0.04 >= reject 0.03 (frame 3, 0.12 s)");
  EXPECT_EQ(queue[1]["model"], "ckpt-b");
  EXPECT_TRUE(fs::exists(dir.path() / "out" / "clip_1.json"));
  EXPECT_NE(queue[2]["error"].get<std::string>().find("no video stream"), std::string::npos);
  EXPECT_TRUE(queue[2]["report"].is_null());
  EXPECT_NE(queue[5]["error"].get<std::string>().find("gone.mp4"), std::string::npos);
  EXPECT_TRUE(fs::exists(dir.path() / "out" / "index.html"));
  EXPECT_EQ(store_rows(dir.path() / "out" / "clipwarden.db"), 4u);  // errors are not stored
  EXPECT_EQ(cli::gate_exit_status(run->counts, Verdict::reject),
            cli::kExitInputError);  // 3 outranks 1
}

TEST(GateRun, RerunTakesJudgedClipsFromTheStore) {
  TempDir dir;
  FakeAnalysis fake;
  const auto inputs =
      make_clips(dir.path() / "clips", 6, {"pass", "reject", "review", "broken", "pass", "broken"});
  ASSERT_TRUE(run_gate(inputs, options_for(dir.path() / "out", fake)).ok());
  EXPECT_EQ(fake.calls, 6);
  fake.calls = 0;
  auto again = run_gate(inputs, options_for(dir.path() / "out", fake));
  ASSERT_TRUE(again.ok());
  EXPECT_EQ(fake.calls, 2);  // only the two broken clips are tried again
  EXPECT_EQ(again->counts.from_store, 4);
  EXPECT_EQ(store_rows(dir.path() / "out" / "clipwarden.db"), 4u);
  for (const auto& line : queue_of(dir.path() / "out"))
    EXPECT_EQ(line["from_store"], line["verdict"] != "error") << line.dump();

  // A stored report that no longer exists is recomputed and stored again,
  // replacing the row that named it: the store keeps one row per clip.
  fs::remove(dir.path() / "out" / "clip_1.json");
  fake.calls = 0;
  auto third = run_gate(inputs, options_for(dir.path() / "out", fake));
  ASSERT_TRUE(third.ok());
  EXPECT_EQ(fake.calls, 3);
  EXPECT_FALSE(third->results[1].from_store);
  EXPECT_TRUE(fs::exists(dir.path() / "out" / "clip_1.json"));
  EXPECT_EQ(store_rows(dir.path() / "out" / "clipwarden.db"), 4u);

  // Another policy is another settings hash: everything is recomputed.
  fake.calls = 0;
  GateOptions strict = options_for(dir.path() / "out", fake);
  strict.policy.coherence_review_below = 99;
  ASSERT_TRUE(run_gate(inputs, strict).ok());
  EXPECT_EQ(fake.calls, 6);
}

TEST(GateRun, SharedStoreServesAnotherOutputFolder) {
  TempDir dir;
  FakeAnalysis fake;
  const auto inputs = make_clips(dir.path() / "clips", 3, {"pass", "reject"});
  GateOptions first = options_for(dir.path() / "out1", fake);
  first.db_path = (dir.path() / "shared.db").string();
  ASSERT_TRUE(run_gate(inputs, first).ok());
  GateOptions second = first;
  second.out_dir = (dir.path() / "out2").string();
  auto run = run_gate(inputs, second);
  ASSERT_TRUE(run.ok());
  EXPECT_EQ(run->counts.from_store, 3);
  EXPECT_EQ(fake.calls, 3);
  for (int i = 0; i < 3; ++i)
    EXPECT_TRUE(fs::exists(dir.path() / "out2" / ("clip_" + std::to_string(i) + ".json")));
  EXPECT_FALSE(fs::exists(dir.path() / "out2" / "clipwarden.db"));
}

TEST(GateRun, ParallelJobsJudgeEveryClipOnce) {
  TempDir dir;
  FakeAnalysis fake;
  const auto inputs = make_clips(dir.path() / "clips", 40, {"pass", "reject", "review"});
  int callbacks = 0;
  GateObserver observer;
  observer.on_clip_done = [&](const ClipResult&, const GateCounts& counts) {
    EXPECT_EQ(counts.total, ++callbacks);
  };
  auto run = run_gate(inputs, options_for(dir.path() / "out", fake, 8), observer);
  ASSERT_TRUE(run.ok());
  EXPECT_EQ(fake.calls, 40);
  EXPECT_EQ(callbacks, 40);
  std::set<std::string> ids;
  for (const auto& line : queue_of(dir.path() / "out")) ids.insert(line["id"].get<std::string>());
  EXPECT_EQ(ids.size(), 40u);
  EXPECT_EQ(store_rows(dir.path() / "out" / "clipwarden.db"), 40u);
}

TEST(GateRun, UnionOfShardsEqualsOneRun) {
  TempDir dir;
  FakeAnalysis fake;
  const auto inputs =
      make_clips(dir.path() / "clips", 30, {"pass", "reject", "review", "broken", "pass"});
  ASSERT_TRUE(run_gate(inputs, options_for(dir.path() / "single", fake)).ok());
  std::vector<std::string> shard_dirs;
  for (int i = 0; i < 3; ++i) {
    const fs::path out = dir.path() / ("shard" + std::to_string(i));
    ASSERT_TRUE(run_gate(select_shard(inputs, {i, 3}), options_for(out, fake)).ok());
    shard_dirs.push_back(out.string());
  }
  auto merged = merge_gate_outputs(shard_dirs, (dir.path() / "merged").string());
  ASSERT_TRUE(merged.ok()) << merged.error().message();
  EXPECT_TRUE(merged->warnings.empty());

  const auto single = queue_of(dir.path() / "single");
  const auto joined = queue_of(dir.path() / "merged");
  ASSERT_EQ(joined.size(), single.size());
  for (size_t i = 0; i < single.size(); ++i) {
    nlohmann::json a = single[i], b = joined[i];
    a.erase("from_store");
    b.erase("from_store");
    EXPECT_EQ(a, b) << "clip " << i;
    if (!b["report"].is_null())
      EXPECT_TRUE(fs::exists(dir.path() / "merged" / b["report"].get<std::string>()));
  }
  EXPECT_EQ(store_rows(dir.path() / "merged" / "clipwarden.db"),
            store_rows(dir.path() / "single" / "clipwarden.db"));
  auto store = ResultStore::open((dir.path() / "merged" / "clipwarden.db").string());
  ASSERT_TRUE(store.ok());
  const auto rows = (*store)->all();
  ASSERT_TRUE(rows.ok());
  for (const auto& row : *rows)  // rows point at the merged copies
    EXPECT_EQ(fs::path(row.report_path).parent_path(), fs::weakly_canonical(dir.path() / "merged"));
  EXPECT_TRUE(fs::exists(dir.path() / "merged" / "index.html"));

  // The same shard twice: kept once, said so, no row copied twice.
  shard_dirs.push_back(shard_dirs[0]);
  auto twice = merge_gate_outputs(shard_dirs, (dir.path() / "merged2").string());
  ASSERT_TRUE(twice.ok());
  EXPECT_EQ(twice->results.size(), single.size());
  EXPECT_FALSE(twice->warnings.empty());
  EXPECT_EQ(store_rows(dir.path() / "merged2" / "clipwarden.db"),
            store_rows(dir.path() / "single" / "clipwarden.db"));
  // Merging into one of the inputs is refused.
  EXPECT_FALSE(merge_gate_outputs({shard_dirs[0]}, shard_dirs[0]).ok());
}

TEST(GateRun, QueueLinesReadBack) {
  ClipResult r;
  r.input.index = 7;
  r.input.id = "take 7";
  r.input.path = "shots/take 7.mp4";
  r.input.model = "ckpt-b";
  r.input.prompt_id = "p-3";
  r.input.seed = 99;
  r.input.metadata = {{"cfg", 7}};
  r.verdict = Verdict::review;
  r.coherence = 71.5;
  r.reasons = {"cut segment peak 0.7 >= review 0.5 (frame 9, 0.38 s)"};
  r.report = "take_7.json";
  r.sha256 = std::string(64, 'c');
  auto back = clip_result_from_queue_line(queue_line(r), "q");
  ASSERT_TRUE(back.ok()) << back.error().message();
  EXPECT_EQ(queue_line(*back), queue_line(r));
  ClipResult failed;
  failed.input.id = failed.input.path = "bad.mp4";
  failed.error = input_error("bad.mp4", "no video stream");
  auto failed_back = clip_result_from_queue_line(queue_line(failed), "q");
  ASSERT_TRUE(failed_back.ok());
  EXPECT_EQ(queue_status(*failed_back), "error");
  EXPECT_EQ(failed_back->error->message(), "bad.mp4: no video stream");
}

TEST(GateRun, IndexPageEscapesInputsAndListsWorstFirst) {
  TempDir dir;
  FakeAnalysis fake;
  auto inputs = make_clips(dir.path() / "clips", 4, {"pass", "review", "reject", "broken"});
  inputs[0].id = "<script>alert('x')</script>";
  inputs[1].model = "\"><img src=x onerror=alert(1)>";
  ASSERT_TRUE(run_gate(inputs, options_for(dir.path() / "out", fake)).ok());
  const std::string page = read_text(dir.path() / "out" / "index.html");
  EXPECT_EQ(page.find("<script"), std::string::npos);
  EXPECT_EQ(page.find("<img"), std::string::npos);
  EXPECT_NE(page.find("&lt;script&gt;alert(&#39;x&#39;)&lt;/script&gt;"), std::string::npos);
  EXPECT_NE(page.find("Content-Security-Policy"), std::string::npos);
  EXPECT_EQ(page.find("http://"), std::string::npos);
  EXPECT_EQ(page.find("https://"), std::string::npos);
  const size_t reject = page.find("<tr class=\"reject\""),
               review = page.find("<tr class=\"review\""), error = page.find("<tr class=\"error\""),
               pass = page.find("<tr class=\"pass\"");
  ASSERT_NE(pass, std::string::npos);
  EXPECT_LT(reject, review);
  EXPECT_LT(review, error);
  EXPECT_LT(error, pass);
  EXPECT_NE(page.find("href=\"clip_2.json\""), std::string::npos);
}

TEST(GateRun, ExitStatusFollowsFailOn) {
  GateCounts c;
  EXPECT_EQ(cli::gate_exit_status(c, Verdict::reject), cli::kExitOk);
  c.review = 1;
  EXPECT_EQ(cli::gate_exit_status(c, Verdict::reject), cli::kExitOk);
  EXPECT_EQ(cli::gate_exit_status(c, Verdict::review), cli::kExitGateFailed);
  c.reject = 1;
  EXPECT_EQ(cli::gate_exit_status(c, Verdict::reject), cli::kExitGateFailed);
  c.error = 1;
  EXPECT_EQ(cli::gate_exit_status(c, Verdict::reject), cli::kExitInputError);
}

// A shard folder is input: its queue may name any file as a report. merge
// takes only report files inside the shard folder whose clip hash is the
// queue line's, checks every line before writing anything, and refuses the
// rest naming the line and the reason.
TEST(GateRun, MergeRefusesReportsOutsideTheShardOrOfAnotherClip) {
  TempDir dir;
  FakeAnalysis fake;
  const auto inputs = make_clips(dir.path() / "clips", 2, {"pass", "review"});
  const fs::path shard = dir.path() / "shard";
  ASSERT_TRUE(run_gate(inputs, options_for(shard, fake)).ok());
  const std::string queue = read_text(shard / "queue.jsonl");
  write_text(dir.path() / "secret.json", "{\"secret\": true}\n");
  fs::create_symlink(dir.path() / "secret.json", shard / "link.json");

  const std::vector<std::pair<std::string, std::string>> cases = {
      {"/etc/passwd", "is not a report file name in the shard folder"},
      {"../secret.json", "is not a report file name in the shard folder"},
      {"sub/../clip_0.json", "is not a report file name in the shard folder"},
      {"link.json", "leads outside the shard folder"},
      {"clip_1.json", "is of another clip"},
  };
  for (const auto& [report, why] : cases) {
    std::string tampered = queue;
    const std::string from = "\"report\":\"clip_0.json\"";
    const size_t at = tampered.find(from);
    ASSERT_NE(at, std::string::npos) << queue;
    tampered.replace(at, from.size(), "\"report\":" + nlohmann::json(report).dump());
    write_text(shard / "queue.jsonl", tampered);
    const fs::path out = dir.path() / "merged";
    fs::remove_all(out);
    auto merged = merge_gate_outputs({shard.string()}, out.string());
    ASSERT_FALSE(merged.ok()) << report << " was merged";
    EXPECT_EQ(merged.error().kind, ErrorKind::input);
    EXPECT_NE(merged.error().message().find("queue.jsonl:1"), std::string::npos)
        << merged.error().message();
    EXPECT_NE(merged.error().message().find(why), std::string::npos) << merged.error().message();
    EXPECT_FALSE(fs::exists(out)) << "nothing is written when a shard is refused";
  }
  write_text(shard / "queue.jsonl", queue);
  auto merged = merge_gate_outputs({shard.string()}, (dir.path() / "merged").string());
  ASSERT_TRUE(merged.ok()) << merged.error().message();
  EXPECT_EQ(merged->results.size(), 2u);
}

// Two gates sharing one store at the same time (threads here; processes
// claim the same way): each clip is analysed once over both, both queues
// are complete, and the store holds one row per clip. The fake analysis
// takes 30 ms so the two batches overlap; the counts hold for any overlap.
TEST(GateRun, TwoGatesSharingAStoreAnalyseEachClipOnce) {
  TempDir dir;
  FakeAnalysis fake;
  const auto inputs = make_clips(dir.path() / "clips", 8, {"pass", "review", "reject"});
  const AnalyzeFunction quick = fake.function();
  auto slow = [&](const std::string& path, const AnalysisSettings& s, const Policy& p,
                  const AnalysisHooks& h) {
    std::this_thread::sleep_for(std::chrono::milliseconds(30));
    return quick(path, s, p, h);
  };
  std::vector<GateOptions> options;
  for (const char* out : {"a", "b"}) {
    GateOptions o = options_for(dir.path() / out, fake);
    o.db_path = (dir.path() / "shared.db").string();
    o.analyze = slow;
    options.push_back(o);
  }
  std::optional<Expected<GateRun>> a, b;
  std::thread other([&] { b = run_gate(inputs, options[1]); });
  a = run_gate(inputs, options[0]);
  other.join();
  ASSERT_TRUE(a->ok()) << a->error().message();
  ASSERT_TRUE(b->ok()) << b->error().message();
  EXPECT_EQ(fake.calls, 8) << "a clip was analysed by both gates";
  EXPECT_EQ((*a)->counts.total, 8);
  EXPECT_EQ((*b)->counts.total, 8);
  EXPECT_EQ((*a)->counts.from_store + (*b)->counts.from_store, 8);
  EXPECT_EQ(queue_of(dir.path() / "a").size(), 8u);
  EXPECT_EQ(queue_of(dir.path() / "b").size(), 8u);
  EXPECT_EQ(store_rows(dir.path() / "shared.db"), 8u);
}
