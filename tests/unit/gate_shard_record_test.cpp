// DIR/shard.json and merge's check of a set of shard folders (docs/gate.md,
// "Shards on a cluster"), on records written by hand as a scheduler's
// leftovers would be: all shards finished, one never started (cancelled
// while pending), one killed mid-run, shards of two different batches.
#include <gtest/gtest.h>

#include "clipwarden/gate.h"
#include "support/clips.h"
#include "support/gate_files.h"

using namespace clipwarden;
using namespace clipwarden::test;

namespace {

// A shard folder as `gate --shard I/N` leaves it: its record and a queue of
// `lines` clips (merge's check only counts them).
std::string shard_dir(const TempDir& dir, const std::string& name, int index, int count, int clips,
                      int lines, bool finished, const std::string& list = "abc") {
  const auto folder = dir.path() / name;
  write_text(folder / "shard.json",
             "{\"schema\": \"clipwarden.shard/1\", \"index\": " + std::to_string(index) +
                 ", \"count\": " + std::to_string(count) +
                 ", \"inputs\": 12, \"inputs_sha256\": \"" + list +
                 "\", \"clips\": " + std::to_string(clips) +
                 ", \"finished\": " + (finished ? "true" : "false") + "}\n");
  std::string queue;
  for (int i = 0; i < lines; ++i) queue += "{\"index\": " + std::to_string(i) + "}\n";
  write_text(folder / "queue.jsonl", queue);
  return folder.string();
}

std::string refusal(const std::vector<std::string>& dirs) {
  auto st = check_shard_set(dirs);
  return st ? "" : st.error().message();
}

}  // namespace

TEST(GateShardRecord, CompleteSetPassesAndPlainFoldersAreNotChecked) {
  TempDir dir;
  std::vector<std::string> dirs;
  for (int i = 0; i < 4; ++i)
    dirs.push_back(shard_dir(dir, "s" + std::to_string(i), i, 4, 3, 3, true));
  EXPECT_EQ(refusal(dirs), "");
  write_text(dir.path() / "plain" / "queue.jsonl", "{}\n");  // a run without --shard
  EXPECT_EQ(refusal({dir.file("plain")}), "");
  const std::string mixed = refusal({dirs[0], dir.file("plain")});
  EXPECT_NE(mixed.find("plain: has no shard.json but"), std::string::npos) << mixed;
}

TEST(GateShardRecord, MissingShardIsNamed) {
  TempDir dir;
  const auto s0 = shard_dir(dir, "s0", 0, 4, 3, 3, true);
  const auto s1 = shard_dir(dir, "s1", 1, 4, 3, 3, true);
  const auto s3 = shard_dir(dir, "s3", 3, 4, 3, 3, true);
  const std::string one = refusal({s0, s1, s3});
  EXPECT_NE(one.find("merge: shard 2 of 4 is missing"), std::string::npos) << one;
  const std::string two = refusal({s0, s3});
  EXPECT_NE(two.find("merge: shards 1, 2 of 4 are missing"), std::string::npos) << two;
}

TEST(GateShardRecord, UnfinishedShardIsNamedWithWhatItsQueueHolds) {
  TempDir dir;
  const auto s0 = shard_dir(dir, "s0", 0, 2, 3, 3, true);
  const auto s1 = shard_dir(dir, "s1", 1, 2, 3, 1, false);  // killed after one clip
  const std::string e = refusal({s0, s1});
  EXPECT_NE(e.find("s1: shard 1 of 2 did not finish (1 of its 3 clips in its queue"),
            std::string::npos)
      << e;
}

TEST(GateShardRecord, OtherBatchDuplicateAndShortQueueAreRefused) {
  TempDir dir;
  const auto s0 = shard_dir(dir, "s0", 0, 2, 3, 3, true);
  const auto other = shard_dir(dir, "other", 1, 2, 3, 3, true, "def");
  EXPECT_NE(refusal({s0, other}).find("of another input list"), std::string::npos);
  const auto twice = shard_dir(dir, "twice", 0, 2, 3, 3, true);
  EXPECT_NE(refusal({s0, twice}).find("holds shard 0 of 2, as"), std::string::npos);
  const auto shorter = shard_dir(dir, "short", 1, 2, 3, 2, true);  // finished, yet 2 of 3 lines
  EXPECT_NE(refusal({s0, shorter}).find("queue.jsonl has 2 clips but shard 1 of 2 has 3"),
            std::string::npos);
  write_text(dir.path() / "bad" / "shard.json", "{\"schema\": \"clipwarden.shard/1\"}");
  EXPECT_NE(refusal({dir.file("bad")}).find("index: not a whole number"), std::string::npos);
}

TEST(GateShardRecord, RecordOfAShareAndItsRoundTrip) {
  std::vector<GateInput> inputs(3);
  inputs[0].id = "a.mp4";
  inputs[1].id = "b.mp4";
  inputs[2].id = "c.mp4";
  const ShardSpec spec{1, 2};
  const ShardRecord r = shard_record(inputs, spec);
  EXPECT_EQ(r.inputs, 3);
  EXPECT_EQ(r.clips, static_cast<int64_t>(select_shard(inputs, spec).size()));
  EXPECT_FALSE(r.finished);
  // Python's hashlib.sha256(b"a.mp4\nb.mp4\nc.mp4\n").hexdigest().
  EXPECT_EQ(r.inputs_sha256, "ccfd992a0dd2b95e0bf3a0f5216a47cb7289617ec865cda535359e1862ce9a22");
  TempDir dir;
  ShardRecord done = r;
  done.finished = true;
  ASSERT_TRUE(write_shard_record(dir.path().string(), done));
  auto back = read_shard_record(dir.path().string());
  ASSERT_TRUE(back && *back);
  EXPECT_EQ((*back)->shard.index, 1);
  EXPECT_EQ((*back)->shard.count, 2);
  EXPECT_EQ((*back)->clips, r.clips);
  EXPECT_EQ((*back)->inputs_sha256, r.inputs_sha256);
  EXPECT_TRUE((*back)->finished);
}
