// The results store (analyzer/store/). SHA-256 check values are the FIPS
// 180-2 appendix B examples ("abc", the 448-bit message) and the digest of
// the empty string, each confirmed with coreutils' sha256sum; WAL mode is
// read back through SQLite itself.
#include <gtest/gtest.h>
#include <sqlite3.h>

#include <filesystem>
#include <set>
#include <thread>

#include "analyzer/store/result_store.h"
#include "analyzer/store/hashing.h"
#include "support/clips.h"
#include "support/gate_files.h"

using namespace clipwarden;
using namespace clipwarden::test;
namespace fs = std::filesystem;

namespace {

StoredAnalysis row(const std::string& content, const std::string& clip_id,
                   Verdict v = Verdict::pass) {
  StoredAnalysis r;
  r.content_sha256 = content;
  r.settings_hash = "settings-1";
  r.tool_version = "0.1.0";
  r.clip_id = clip_id;
  r.clip_path = "clips/" + clip_id + ".mp4";
  r.model = "ckpt-a";
  r.prompt_id = "p-1";
  r.verdict = v;
  r.coherence = 88.5;
  r.reasons = {"flicker p95 0.02 >= review 0.012 (frames 3-9, 0.12-0.38 s)"};
  r.summary = {{"coherence", 88.5}};
  r.report_path = "/tmp/out/" + clip_id + ".json";
  return r;
}

}  // namespace

TEST(GateStore, Sha256CheckValues) {
  EXPECT_EQ(sha256_hex(""), "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
  EXPECT_EQ(sha256_hex("abc"), "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  EXPECT_EQ(sha256_hex("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq"),
            "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
}

TEST(GateStore, ContentHashOfFilesAndFrameFolders) {
  TempDir dir;
  write_text(dir.path() / "abc.bin", "abc");
  EXPECT_EQ(*content_sha256((dir.path() / "abc.bin").string()),
            "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  write_text(dir.path() / "frames" / "f_002.png", "two");
  write_text(dir.path() / "frames" / "f_001.png", "one");
  const std::string folder = (dir.path() / "frames").string();
  auto first = content_sha256(folder);
  ASSERT_TRUE(first.ok());
  // Defined from the sorted listing, independent of creation order.
  EXPECT_EQ(*first, sha256_hex("f_001.png " + sha256_hex("one") + "\nf_002.png " +
                               sha256_hex("two") + "\n"));
  write_text(dir.path() / "frames" / "f_002.png", "changed");
  EXPECT_NE(*content_sha256(folder), *first);
  auto missing = content_sha256((dir.path() / "nope.mp4").string());
  ASSERT_FALSE(missing.ok());
  EXPECT_EQ(missing.error().kind, ErrorKind::input);
}

TEST(GateStore, SettingsHashIgnoresThreadsButNotResults) {
  AnalysisSettings a;
  AnalysisSettings threaded = a;
  threaded.threads = 7;
  EXPECT_EQ(settings_hash(a, default_policy()), settings_hash(threaded, default_policy()));
  AnalysisSettings wide = a;
  wide.working_long_side = 256;
  EXPECT_NE(settings_hash(a, default_policy()), settings_hash(wide, default_policy()));
  Policy strict = default_policy();
  strict.coherence_review_below = 80;
  EXPECT_NE(settings_hash(a, default_policy()), settings_hash(a, strict));
}

TEST(GateStore, InsertFindAndReopen) {
  TempDir dir;
  const std::string db = (dir.path() / "results.db").string();
  {
    auto store = ResultStore::open(db);
    ASSERT_TRUE(store.ok()) << store.error().message();
    StoredAnalysis older = row("sha-a", "a");
    ASSERT_TRUE((*store)->insert(older).ok());
    EXPECT_GT(older.row_id, 0);
    EXPECT_EQ(older.created_at.size(), 24u);  // 2026-01-02T03:04:05.678Z
    StoredAnalysis newer = row("sha-a", "a", Verdict::reject);
    ASSERT_TRUE((*store)->insert(newer).ok());
    auto found = (*store)->find("sha-a", "settings-1");
    ASSERT_TRUE(found.ok());
    ASSERT_TRUE(found->has_value());
    EXPECT_EQ((*found)->row_id, newer.row_id);  // the newest analysis
    EXPECT_EQ((*found)->verdict, Verdict::reject);
    EXPECT_EQ((*found)->reasons, newer.reasons);
    EXPECT_EQ((*found)->summary, newer.summary);
    EXPECT_FALSE((*store)->find("sha-a", "settings-2")->has_value());
    EXPECT_FALSE((*store)->find("sha-b", "settings-1")->has_value());
    // The same clip (content, settings, id) is stored once: the re-analysis
    // replaced the older row, so a later merge never sees it twice (the
    // row count after reopening shows it).
    EXPECT_EQ(*(*store)->contains(newer), ResultStore::Presence::present);
    EXPECT_EQ(*(*store)->contains(row("sha-z", "z")), ResultStore::Presence::absent);
    // The same content under another clip id is another queue entry: kept.
    StoredAnalysis copy = row("sha-a", "a-copy");
    ASSERT_TRUE((*store)->insert(copy).ok());
  }
  auto reopened = ResultStore::open(db);
  ASSERT_TRUE(reopened.ok());
  auto rows = (*reopened)->all();
  ASSERT_TRUE(rows.ok());
  ASSERT_EQ(rows->size(), 2u);
  EXPECT_EQ((*rows)[0].verdict, Verdict::reject);
  EXPECT_EQ((*rows)[0].clip_path, "clips/a.mp4");
  EXPECT_EQ((*rows)[0].model, "ckpt-a");

  sqlite3* raw = nullptr;
  ASSERT_EQ(sqlite3_open(db.c_str(), &raw), SQLITE_OK);
  sqlite3_stmt* stmt = nullptr;
  sqlite3_prepare_v2(raw, "PRAGMA journal_mode", -1, &stmt, nullptr);
  ASSERT_EQ(sqlite3_step(stmt), SQLITE_ROW);
  EXPECT_STREQ(reinterpret_cast<const char*>(sqlite3_column_text(stmt, 0)), "wal");
  sqlite3_finalize(stmt);
  sqlite3_close(raw);
}

TEST(GateStore, ConcurrentWritersLoseNothing) {
  // Four threads on one connection and two more connections on the same file
  // (as separate processes would be), all inserting at once.
  TempDir dir;
  const std::string db = (dir.path() / "results.db").string();
  auto shared = ResultStore::open(db);
  auto other_a = ResultStore::open(db);
  auto other_b = ResultStore::open(db);
  ASSERT_TRUE(shared.ok() && other_a.ok() && other_b.ok());
  std::vector<ResultStore*> stores = {shared->get(), shared->get(),  shared->get(),
                                      shared->get(), other_a->get(), other_b->get()};
  constexpr int kEach = 40;
  std::vector<std::thread> threads;
  std::atomic<int> failures{0};
  for (size_t t = 0; t < stores.size(); ++t)
    threads.emplace_back([&, t] {
      for (int i = 0; i < kEach; ++i) {
        StoredAnalysis r =
            row("sha-" + std::to_string(t) + "-" + std::to_string(i), "c" + std::to_string(i));
        if (!stores[t]->insert(r).ok()) ++failures;
        if (!stores[t]->find(r.content_sha256, r.settings_hash).ok()) ++failures;
      }
    });
  for (auto& th : threads) th.join();
  EXPECT_EQ(failures, 0);
  auto rows = (*shared)->all();
  ASSERT_TRUE(rows.ok());
  EXPECT_EQ(rows->size(), stores.size() * kEach);
  std::set<std::string> keys;
  for (const auto& r : *rows) keys.insert(r.content_sha256);
  EXPECT_EQ(keys.size(), stores.size() * kEach);
}

TEST(GateStore, UnusablePathIsAnErrorNamingIt) {
  auto store = ResultStore::open("/nonexistent-dir/sub/results.db");
  ASSERT_FALSE(store.ok());
  EXPECT_NE(store.error().message().find("/nonexistent-dir/sub/results.db"), std::string::npos);
}
