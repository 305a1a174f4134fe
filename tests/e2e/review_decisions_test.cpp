// Decisions through `clipwarden review` (docs/review.md, "Decisions"): a
// stream of decisions with the server killed (SIGKILL) in the middle and
// restarted, each request the client got no answer to sent again, as the
// page does: every answered decision is stored exactly once and nothing is
// stored twice. Two clients deciding at once through one server, and a
// second server on the same store, lose nothing. --export writes them all.
#include <gtest/gtest.h>
#include <signal.h>

#include <filesystem>
#include <map>
#include <set>
#include <thread>

#include "support/clips.h"
#include "support/gate_files.h"
#include "support/review_server.h"

using namespace clipwarden::test;
namespace fs = std::filesystem;
using nlohmann::json;

namespace {

std::vector<std::string> clip_keys(const ReviewProcess& server) {
  std::vector<std::string> keys;
  const json q = json::parse(server.get("/api/queue?token=" + server.token()).body, nullptr, false);
  if (q.is_object())
    for (const auto& c : q["clips"]) keys.push_back(c["key"]);
  return keys;
}

// request id -> how many rows carry it
std::map<std::string, int> stored_requests(const ReviewProcess& server) {
  std::map<std::string, int> out;
  const json d = json::parse(server.get("/api/decisions?token=" + server.token()).body, nullptr, false);
  if (d.is_object())
    for (const auto& row : d["decisions"]) ++out[row["request_id"].get<std::string>()];
  return out;
}

}  // namespace

TEST(ReviewDecisions, SurviveKillNineWithoutLossOrDoubles) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  std::string why;
  const fs::path out = make_gate_folder(dir.path(), 3, why);
  ASSERT_FALSE(out.empty()) << why;
  constexpr int kDecisions = 60;
  const std::vector<std::string> words = {"keep", "reject", "second_look"};
  std::set<std::string> answered, sent;
  int kills = 0;
  auto server = std::make_unique<ReviewProcess>(out, dir.path() / "log-0");
  ASSERT_TRUE(server->ok()) << server->log();
  const auto keys = clip_keys(*server);
  ASSERT_EQ(keys.size(), 3u);
  for (int i = 0; i < kDecisions; ++i) {
    const std::string id = "request-" + std::to_string(i);
    sent.insert(id);
    // A kill from another thread while this request is on its way (every
    // 15th), so some die before, during or after their commit.
    std::thread killer;
    if (i % 15 == 7) {
      const int pid = server->pid();
      killer = std::thread([pid] { kill(pid, SIGKILL); });
    }
    HttpAnswer a = server->decide(keys[i % 3], words[i % 3], id);
    if (killer.joinable()) killer.join();
    while (a.status != 200) {
      // No answer: the server is gone. Restart it and send the same request.
      server->stop(SIGKILL);
      ++kills;
      ASSERT_LT(kills, 20) << "the server keeps failing";
      server = std::make_unique<ReviewProcess>(out, dir.path() / ("log-" + std::to_string(kills)));
      ASSERT_TRUE(server->ok()) << server->log();
      a = server->decide(keys[i % 3], words[i % 3], id);
    }
    answered.insert(id);
  }
  EXPECT_GE(kills, 1);
  const auto stored = stored_requests(*server);
  for (const auto& id : answered) EXPECT_EQ(stored.count(id), 1u) << id << " was answered but is not stored";
  for (const auto& [id, n] : stored) {
    EXPECT_EQ(n, 1) << id << " stored " << n << " times";
    EXPECT_TRUE(sent.count(id)) << id;
  }
  EXPECT_EQ(stored.size(), static_cast<size_t>(kDecisions));
  EXPECT_EQ(server->stop(SIGINT), 0);

  // --export: one line per decision, in the order they were stored.
  auto exported = run_command({CLIPWARDEN_BINARY, "review", out.string(), "--export", dir.file("decisions.jsonl")});
  ASSERT_EQ(exported.exit_code, 0) << exported.err;
  const auto lines = read_lines(dir.path() / "decisions.jsonl");
  ASSERT_EQ(lines.size(), static_cast<size_t>(kDecisions));
  int64_t last = 0;
  for (const auto& line : lines) {
    const json j = json::parse(line);
    EXPECT_GT(j["id"].get<int64_t>(), last);
    last = j["id"];
    for (const char* key : {"request_id", "clip_id", "sha256", "reviewer", "decided_at", "decision", "tags", "note",
                            "tool_verdict", "tool_reasons"})
      EXPECT_TRUE(j.contains(key)) << key;
    EXPECT_EQ(j["reviewer"], "tester");
  }
}

TEST(ReviewDecisions, TwoClientsAndTwoServersAtOnceLoseNothing) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  std::string why;
  const fs::path out = make_gate_folder(dir.path(), 2, why);
  ASSERT_FALSE(out.empty()) << why;
  ReviewProcess first(out, dir.path() / "log-a");
  ReviewProcess second(out, dir.path() / "log-b");
  ASSERT_TRUE(first.ok()) << first.log();
  ASSERT_TRUE(second.ok()) << second.log();
  const auto keys = clip_keys(first);
  ASSERT_EQ(keys.size(), 2u);
  constexpr int kEach = 25;
  std::vector<int> failures(3, 0);
  auto client = [&](const ReviewProcess* server, int who) {
    for (int i = 0; i < kEach; ++i)
      if (server->decide(keys[i % 2], i % 2 ? "keep" : "reject", "c" + std::to_string(who) + "-" + std::to_string(i),
                         "reviewer-" + std::to_string(who))
              .status != 200)
        ++failures[static_cast<size_t>(who)];
  };
  // Two clients on one server and a third on the other, all at once.
  std::thread a(client, &first, 0), b(client, &first, 1), c(client, &second, 2);
  a.join();
  b.join();
  c.join();
  EXPECT_EQ(failures, (std::vector<int>{0, 0, 0}));
  const auto stored = stored_requests(second);
  EXPECT_EQ(stored.size(), static_cast<size_t>(3 * kEach));
  for (const auto& [id, n] : stored) EXPECT_EQ(n, 1) << id;
  // The queue page shows the newest decision of each clip to both servers.
  const std::string page = first.get("/?token=" + first.token()).body;
  EXPECT_NE(page.find("<span id=\"left\">0</span> of 2 clips left to decide"), std::string::npos);
  EXPECT_EQ(first.stop(SIGINT), 0);
  EXPECT_EQ(second.stop(SIGTERM), 0);
}
