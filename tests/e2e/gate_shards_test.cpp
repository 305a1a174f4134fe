// Shards (docs/gate.md): `gate --shard I/N` runs, one of them taking its index
// from a Kubernetes indexed Job's JOB_COMPLETION_INDEX, joined by `merge`,
// equal a single run clip for clip, with no duplicates.
#include <gtest/gtest.h>
#include <stdlib.h>

#include <filesystem>
#include <set>

#include "analyzer/store/result_store.h"
#include "support/clips.h"
#include "support/gate_files.h"

using namespace clipwarden;
using namespace clipwarden::test;
namespace fs = std::filesystem;

namespace {

std::vector<nlohmann::json> queue_of(const fs::path& out) {
  std::vector<nlohmann::json> lines;
  for (const auto& l : read_lines(out / "queue.jsonl")) lines.push_back(nlohmann::json::parse(l));
  return lines;
}

size_t stored_rows(const fs::path& db) {
  auto store = ResultStore::open(db.string());
  if (!store) return 0;
  auto rows = (*store)->all();
  return rows ? rows->size() : 0;
}

}  // namespace

TEST(GateShards, UnionOfShardRunsEqualsOneRun) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  ASSERT_EQ(make_varied_clips(dir.path() / "clips", 7), "");
  write_text(dir.path() / "clips" / "broken.mp4",
             "not a video");  // errors travel through merge too
  auto gate = [&](const std::string& out, std::vector<std::string> extra) {
    std::vector<std::string> args = {
        CLIPWARDEN_BINARY, "gate", dir.file("clips"), "--out", dir.file(out),
        "--width",        "160",  "--jobs",          "2",     "--no-html"};
    args.insert(args.end(), extra.begin(), extra.end());
    return run_command(args);
  };
  const auto single = gate("single", {});
  ASSERT_EQ(single.exit_code, 3) << single.err;

  std::vector<std::string> shard_dirs;
  size_t shard_total = 0;
  for (int i = 0; i < 3; ++i) {
    const std::string out = "shard" + std::to_string(i);
    CommandResult r;
    if (i == 2) {
      setenv("JOB_COMPLETION_INDEX", "2", 1);
      r = gate(out, {"--shard", "auto/3"});
      unsetenv("JOB_COMPLETION_INDEX");
    } else {
      r = gate(out, {"--shard", std::to_string(i) + "/3"});
    }
    ASSERT_TRUE(r.exit_code >= 0 && r.exit_code <= 3 && r.exit_code != 2) << r.err;
    shard_total += queue_of(dir.path() / out).size();
    shard_dirs.push_back(dir.file(out));
  }
  EXPECT_EQ(shard_total, 8u);  // the shares partition the inputs

  std::vector<std::string> args = {CLIPWARDEN_BINARY, "merge"};
  args.insert(args.end(), shard_dirs.begin(), shard_dirs.end());
  args.insert(args.end(), {"--out", dir.file("merged")});
  const auto merged = run_command(args);
  EXPECT_EQ(merged.exit_code, 3) << merged.err;  // the broken clip is in the merged queue

  const auto one = queue_of(dir.path() / "single");
  const auto joined = queue_of(dir.path() / "merged");
  ASSERT_EQ(joined.size(), one.size());
  std::set<std::string> ids;
  for (size_t i = 0; i < one.size(); ++i) {
    nlohmann::json a = one[i], b = joined[i];
    a.erase("from_store");
    b.erase("from_store");
    EXPECT_EQ(a, b) << "clip " << i;
    ids.insert(b["id"].get<std::string>());
    if (!b["report"].is_null())
      EXPECT_TRUE(fs::exists(dir.path() / "merged" / b["report"].get<std::string>()));
  }
  EXPECT_EQ(ids.size(), one.size());
  EXPECT_EQ(stored_rows(dir.path() / "merged" / "clipwarden.db"), 7u);
  EXPECT_TRUE(fs::exists(dir.path() / "merged" / "index.html"));
}

TEST(GateShards, MergeRefusesAMissingShardUntilItHasRun) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  ASSERT_EQ(make_varied_clips(dir.path() / "clips", 6), "");
  auto shard = [&](int i) {
    const std::string out = "shard" + std::to_string(i);
    const auto r = run_command({CLIPWARDEN_BINARY, "gate", dir.file("clips"), "--out",
                                dir.file(out), "--width", "160", "--jobs", "2", "--no-html",
                                "--shard", std::to_string(i) + "/3"});
    EXPECT_TRUE(r.exit_code == 0 || r.exit_code == 1) << r.err;
    return dir.file(out);
  };
  auto merge = [&](std::vector<std::string> dirs) {
    std::vector<std::string> args = {CLIPWARDEN_BINARY, "merge"};
    args.insert(args.end(), dirs.begin(), dirs.end());
    args.insert(args.end(), {"--out", dir.file("merged")});
    return run_command(args);
  };
  const std::vector<std::string> first_two = {shard(0), shard(1)};
  // Each finished shard says so, with its share's size (docs/gate.md).
  const auto record = nlohmann::json::parse(read_text(dir.path() / "shard0" / "shard.json"));
  EXPECT_EQ(record["finished"], true);
  EXPECT_EQ(record["inputs"], 6);
  EXPECT_EQ(record["clips"].get<size_t>(), queue_of(dir.path() / "shard0").size());

  const auto refused = merge(first_two);
  EXPECT_EQ(refused.exit_code, 2);
  EXPECT_NE(refused.err.find("shard 2 of 3 is missing"), std::string::npos) << refused.err;
  EXPECT_FALSE(fs::exists(dir.path() / "merged" / "queue.jsonl"));

  const auto merged = merge({first_two[0], first_two[1], shard(2)});
  EXPECT_TRUE(merged.exit_code == 0 || merged.exit_code == 1) << merged.err;
  EXPECT_EQ(queue_of(dir.path() / "merged").size(), 6u);
}
