// The decisions table (analyzer/store/decision_log.h): append-only, one row
// per request id however often it is sent, the newest decision of a clip is
// its current one, and the file is shared with the gate's analyses table.
#include <gtest/gtest.h>
#include <sqlite3.h>

#include "analyzer/store/decision_log.h"
#include "analyzer/store/result_store.h"
#include "support/clips.h"

using namespace clipwarden;

namespace {

Decision decision(const std::string& request, const std::string& clip, const std::string& what) {
  Decision d;
  d.request_id = request;
  d.clip_id = clip;
  d.decision = what;
  d.reviewer = "ana";
  d.tool_verdict = "review";
  d.tags = {"flicker", "hair <b>"};
  d.note = "looks \"fine\"";
  return d;
}

}  // namespace

TEST(DecisionLog, StoresEachRequestOnceAndKeepsEveryDecision) {
  test::TempDir dir;
  auto log = DecisionLog::open(dir.file("clipwarden.db"));
  ASSERT_TRUE(log) << log.error().message();
  auto a = (*log)->append(decision("r1", "clip-a", "reject"));
  ASSERT_TRUE(a);
  EXPECT_EQ(a->decision, "reject");
  EXPECT_EQ(a->decided_at.size(), 24u) << a->decided_at;  // 2026-12-04T20:00:00.000Z
  auto again = (*log)->append(decision("r1", "clip-a", "keep"));
  ASSERT_TRUE(again);
  EXPECT_EQ(again->id, a->id) << "the same request is stored once";
  EXPECT_EQ(again->decision, "reject") << "and keeps its first content";
  ASSERT_TRUE((*log)->append(decision("r2", "clip-a", "keep")));
  ASSERT_TRUE((*log)->append(decision("r3", "clip-b", "second_look")));
  auto all = (*log)->all();
  ASSERT_TRUE(all);
  ASSERT_EQ(all->size(), 3u);
  EXPECT_EQ((*all)[0].tags, (std::vector<std::string>{"flicker", "hair <b>"}));
  EXPECT_EQ((*all)[0].note, "looks \"fine\"");
  const auto latest = latest_decisions(*all);
  ASSERT_EQ(latest.size(), 2u);
  EXPECT_EQ(latest[0].clip_id, "clip-a");
  EXPECT_EQ(latest[0].decision, "keep");
  EXPECT_EQ(latest[1].decision, "second_look");
}

TEST(DecisionLog, RefusesBadDecisionsAndAnyRewrite) {
  test::TempDir dir;
  const std::string path = dir.file("clipwarden.db");
  auto log = DecisionLog::open(path);
  ASSERT_TRUE(log);
  EXPECT_FALSE((*log)->append(decision("r1", "clip-a", "maybe")));
  EXPECT_FALSE((*log)->append(decision("", "clip-a", "keep")));
  EXPECT_FALSE((*log)->append(decision("r1", "", "keep")));
  ASSERT_TRUE((*log)->append(decision("r1", "clip-a", "keep")));
  sqlite3* db = nullptr;
  ASSERT_EQ(sqlite3_open(path.c_str(), &db), SQLITE_OK);
  EXPECT_NE(sqlite3_exec(db, "UPDATE decisions SET decision = 'reject'", nullptr, nullptr, nullptr), SQLITE_OK);
  EXPECT_NE(sqlite3_exec(db, "DELETE FROM decisions", nullptr, nullptr, nullptr), SQLITE_OK);
  sqlite3_close(db);
  EXPECT_EQ((*log)->all()->front().decision, "keep");
  // The gate's results store opens the same file as before.
  auto store = ResultStore::open(path);
  ASSERT_TRUE(store) << store.error().message();
  EXPECT_TRUE((*store)->all());
}
