// Gate inputs (analyzer/gate/inputs.cpp) and shards (analyzer/gate/shard.cpp).
// Manifests and folders follow our own contract (docs/gate.md); the FNV-1a
// check values are the published ones for 64-bit FNV-1a (Fowler/Noll/Vo test
// suite; "a" and "foobar" recalled from memory and confirmed with a
// three-line Python transcription of the published algorithm; "" is the
// offset basis).
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <map>
#include <set>

#include "clipwarden/gate.h"
#include "support/clips.h"
#include "support/gate_files.h"

using namespace clipwarden;
using namespace clipwarden::test;
namespace fs = std::filesystem;

TEST(GateInputs, ManifestFieldsAndRelativePaths) {
  TempDir dir;
  write_text(dir.path() / "m.jsonl",
             "{\"path\": \"a.mp4\", \"id\": \"clip-a\", \"prompt_id\": \"p1\", \"model\": "
             "\"ckpt-7\", \"seed\": 42, "
             "\"cfg\": 6.5, \"tags\": [\"x\"]}\n"
             "\n"
             "{\"path\": \"/abs/b.mp4\", \"prompt_id\": 17}\r\n");
  auto got = collect_inputs({(dir.path() / "m.jsonl").string()});
  ASSERT_TRUE(got.ok()) << got.error().message();
  ASSERT_EQ(got->inputs.size(), 2u);
  const GateInput& a = got->inputs[0];
  EXPECT_EQ(a.path, (dir.path() / "a.mp4").string());
  EXPECT_EQ(a.id, "clip-a");
  EXPECT_EQ(a.prompt_id, "p1");
  EXPECT_EQ(a.model, "ckpt-7");
  EXPECT_EQ(a.seed, 42);
  EXPECT_EQ(a.metadata, (nlohmann::json{{"cfg", 6.5}, {"tags", {"x"}}}));
  EXPECT_EQ(a.origin, (dir.path() / "m.jsonl").string() + ":1");
  const GateInput& b = got->inputs[1];
  EXPECT_EQ(b.path, "/abs/b.mp4");
  EXPECT_EQ(b.id, "/abs/b.mp4");  // no id: the path is the id
  EXPECT_EQ(b.prompt_id, "17");
  EXPECT_TRUE(b.seed.is_null());
  EXPECT_EQ(b.index, 1);
}

TEST(GateInputs, ManifestErrorsNameFileAndLine) {
  TempDir dir;
  const std::string m = (dir.path() / "m.jsonl").string();
  auto error_of = [&](const std::string& text) {
    write_text(m, text);
    auto got = collect_inputs({m});
    EXPECT_FALSE(got.ok()) << text;
    return got.ok() ? std::string() : got.error().message();
  };
  std::string e = error_of("{\"path\": \"a.mp4\"}\n{\"path\": \"b.mp4\"\n");
  EXPECT_NE(e.find(m + ":2"), std::string::npos) << e;
  EXPECT_NE(e.find("not valid JSON"), std::string::npos) << e;
  e = error_of("{\"path\": \"a.mp4\"}\n\n{\"id\": \"x\"}\n");
  EXPECT_NE(e.find(m + ":3"), std::string::npos) << e;
  EXPECT_NE(e.find("missing \"path\""), std::string::npos) << e;
  e = error_of("[\"a.mp4\"]\n");
  EXPECT_NE(e.find(m + ":1"), std::string::npos) << e;
  e = error_of("{\"path\": 5}\n");
  EXPECT_NE(e.find("\"path\""), std::string::npos) << e;
  e = error_of("{\"path\": \"a.mp4\", \"model\": {\"n\": 1}}\n");
  EXPECT_NE(e.find("\"model\""), std::string::npos) << e;
  e = error_of("{\"path\": \"a.mp4\", \"id\": \"x\"}\n{\"path\": \"b.mp4\", \"id\": \"x\"}\n");
  EXPECT_NE(e.find(m + ":2"), std::string::npos) << e;
  EXPECT_NE(e.find(m + ":1"), std::string::npos) << e;  // names where the id was first used
  auto missing = collect_inputs({(dir.path() / "none.jsonl").string()});
  ASSERT_FALSE(missing.ok());
  EXPECT_EQ(missing.error().kind, ErrorKind::usage);
}

TEST(GateInputs, FoldersAreSearchedForVideosAndFrameFolders) {
  TempDir dir;
  const fs::path root = dir.path() / "batch";
  write_text(root / "b.mp4", "x");
  write_text(root / "a.MOV", "x");
  write_text(root / "notes.txt", "x");
  write_text(root / ".hidden.mp4", "x");
  write_text(root / "deep" / "er" / "c.webm", "x");
  write_text(root / "frames" / "f_0001.png", "x");
  write_text(root / "frames" / "f_0002.png", "x");
  write_text(root / "frames" / "inner.mp4", "x");  // inside a frame folder: part of it, not a clip
  write_text(root / "one_image" / "cover1.png", "x");  // a single image is not a clip
  auto got = collect_inputs({root.string()});
  ASSERT_TRUE(got.ok()) << got.error().message();
  std::vector<std::string> paths;
  for (const auto& in : got->inputs) paths.push_back(in.path);
  EXPECT_EQ(paths, (std::vector<std::string>{(root / "a.MOV").string(), (root / "b.mp4").string(),
                                             (root / "deep" / "er" / "c.webm").string(),
                                             (root / "frames").string()}));
  // A frame folder named directly is one clip.
  auto direct = collect_inputs({(root / "frames").string()});
  ASSERT_TRUE(direct.ok());
  ASSERT_EQ(direct->inputs.size(), 1u);
}

TEST(GateInputs, SpacesAndUnicodeInPaths) {
  TempDir dir;
  const fs::path folder = dir.path() / "prises de vue ü";
  write_text(folder / "plan 1 — été.mp4", "x");
  write_text(folder / "镜头 2.webm", "x");
  write_text(dir.path() / "list.jsonl",
             "{\"path\": \"prises de vue ü/plan 1 — été.mp4\", \"id\": \"été 1\"}\n");
  auto got = collect_inputs({folder.string(), (dir.path() / "list.jsonl").string()});
  ASSERT_TRUE(got.ok()) << got.error().message();
  ASSERT_EQ(got->inputs.size(), 3u);
  EXPECT_EQ(got->inputs[0].path, (folder / "plan 1 — été.mp4").string());
  EXPECT_EQ(got->inputs[1].path, (folder / "镜头 2.webm").string());
  EXPECT_EQ(got->inputs[2].path, (folder / "plan 1 — été.mp4").string());
  EXPECT_EQ(got->inputs[2].id, "été 1");
}

TEST(GateInputs, AClipNamedTwiceIsJudgedOnce) {
  auto got = collect_inputs({"x.mp4", "y.mp4", "x.mp4"});
  ASSERT_TRUE(got.ok());
  ASSERT_EQ(got->inputs.size(), 2u);
  EXPECT_EQ(got->inputs[1].index, 1);
  ASSERT_EQ(got->warnings.size(), 1u);
  EXPECT_NE(got->warnings[0].find("x.mp4"), std::string::npos);
}

TEST(GateShards, ParseIndexCountAndSchedulerEnvironment) {
  std::map<std::string, std::string> env;
  auto getenv = [&](const char* name) -> const char* {
    auto it = env.find(name);
    return it == env.end() ? nullptr : it->second.c_str();
  };
  auto s = parse_shard("2/4", getenv);
  ASSERT_TRUE(s.ok());
  EXPECT_EQ(s->index, 2);
  EXPECT_EQ(s->count, 4);
  for (const char* bad : {"4/4", "-1/4", "1/0", "x/4", "1", "1/4/2", "/4"}) {
    auto e = parse_shard(bad, getenv);
    EXPECT_FALSE(e.ok()) << bad;
    if (!e.ok()) EXPECT_EQ(e.error().kind, ErrorKind::usage);
  }
  EXPECT_FALSE(parse_shard("auto/4", getenv).ok());  // no scheduler index
  env["SLURM_ARRAY_TASK_ID"] = "5";
  // One task rerun alone (sbatch --array=5) has its own id as the array's
  // minimum: the shard is still the task id, not the offset from it.
  env["SLURM_ARRAY_TASK_MIN"] = "5";
  EXPECT_EQ(parse_shard("auto/8", getenv)->index, 5);
  env["SLURM_ARRAY_TASK_ID"] = "8";  // --array=1-8 counts from 1: refused, naming the fix
  env["SLURM_ARRAY_TASK_MIN"] = "1";
  auto from_one = parse_shard("auto/8", getenv);
  ASSERT_FALSE(from_one.ok());
  EXPECT_NE(from_one.error().message().find("--array=0-7"), std::string::npos)
      << from_one.error().message();
  env["JOB_COMPLETION_INDEX"] = "3";  // Kubernetes indexed Job wins when both are set
  EXPECT_EQ(parse_shard("auto/8", getenv)->index, 3);
  env["JOB_COMPLETION_INDEX"] = "8";
  EXPECT_FALSE(parse_shard("auto/8", getenv).ok());
}

TEST(GateShards, FnvCheckValues) {
  EXPECT_EQ(fnv1a_64(""), 0xcbf29ce484222325ull);
  EXPECT_EQ(fnv1a_64("a"), 0xaf63dc4c8601ec8cull);
  EXPECT_EQ(fnv1a_64("foobar"), 0x85944171f73967e8ull);
}

TEST(GateShards, EveryClipInExactlyOneShardAndSharesAreBalanced) {
  std::vector<GateInput> inputs;
  for (int i = 0; i < 2000; ++i) {
    GateInput in;
    in.index = i;
    in.id = "gen/run-3/clip_" + std::to_string(i) + ".mp4";
    inputs.push_back(in);
  }
  for (int n : {1, 2, 3, 7}) {
    std::multiset<std::string> seen;
    for (int i = 0; i < n; ++i) {
      const auto share = select_shard(inputs, {i, n});
      // Balanced within 15% of the fair share (2000 ids; a fair hash stays
      // well inside this).
      EXPECT_NEAR(static_cast<double>(share.size()), 2000.0 / n, 0.15 * 2000.0 / n)
          << i << "/" << n;
      for (size_t k = 1; k < share.size(); ++k)
        EXPECT_LT(share[k - 1].index, share[k].index);  // input order
      for (const auto& in : share) seen.insert(in.id);
    }
    EXPECT_EQ(seen.size(), inputs.size());
    for (const auto& in : inputs) EXPECT_EQ(seen.count(in.id), 1u);
  }
  // Stable: the share depends on the id alone.
  EXPECT_EQ(shard_of("gen/run-3/clip_7.mp4", 5), shard_of(std::string("gen/run-3/clip_7.mp4"), 5));
}
