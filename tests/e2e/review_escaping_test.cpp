// Names from a queue are text on every review page (docs/review.md,
// "Safety"): clip ids, paths, models, prompts and reasons that carry markup
// come back escaped on the queue page, the clip page and the agreement page,
// and the data block of the clip page cannot be closed from inside.
#include <gtest/gtest.h>
#include <signal.h>

#include <filesystem>

#include "support/clips.h"
#include "support/gate_files.h"
#include "support/review_server.h"

using namespace clipwarden::test;
namespace fs = std::filesystem;
using nlohmann::json;

TEST(ReviewEscaping, HostileNamesStayText) {
  TempDir dir;
  const std::string hostile = "<script>alert(1)</script>";
  const json line = {{"index", 0},
                     {"id", hostile + "\"'.mp4"},
                     {"path", "clips/" + hostile + ".mp4"},
                     {"verdict", "review"},
                     {"coherence", 50},
                     {"reasons", {"flicker p95 0.2 >= review 0.04 (frames 1-2, 0.04-0.08 s): " + hostile}},
                     {"report", nullptr},
                     {"model", "<img src=x onerror=alert(2)>"},
                     {"prompt_id", "</script><script>alert(3)</script>"},
                     {"seed", nullptr},
                     {"metadata", json::object()},
                     {"from_store", false},
                     {"sha256", nullptr},
                     {"error", nullptr}};
  write_text(dir.path() / "out" / "queue.jsonl", line.dump() + "\n");
  ReviewProcess server(dir.path() / "out", dir.path() / "log");
  ASSERT_TRUE(server.ok()) << server.log();
  const std::string t = "?token=" + server.token();
  for (const std::string path : {"/", "/clip/0", "/agreement"}) {
    const auto page = server.get(path + t);
    ASSERT_EQ(page.status, 200) << path;
    EXPECT_EQ(page.body.find("<script>alert"), std::string::npos) << path;
    EXPECT_EQ(page.body.find("<img src=x"), std::string::npos) << path;
    EXPECT_EQ(page.body.find("</script><script>alert(3)"), std::string::npos) << path;
  }
  const auto queue = server.get("/" + t);
  EXPECT_NE(queue.body.find("&lt;script&gt;alert(1)&lt;/script&gt;&quot;&#39;.mp4"), std::string::npos);
  EXPECT_NE(queue.body.find("&lt;img src=x onerror=alert(2)&gt;"), std::string::npos);
  EXPECT_EQ(server.stop(SIGINT), 0);
}
