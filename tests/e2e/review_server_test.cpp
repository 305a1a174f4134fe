// `clipwarden review` over a real gate output folder (docs/review.md): the
// server listens on 127.0.0.1 only, prints its address with a random token,
// serves the queue and each clip, and refuses a request without the token,
// with a wrong one, from another origin or another Host, a GET that tries
// to change state, and any path outside the clips the queue names. Ctrl-C
// stops it with status 0.
#include <gtest/gtest.h>
#include <signal.h>

#include <filesystem>
#include <fstream>

#include "support/clips.h"
#include "support/gate_files.h"
#include "support/review_server.h"

using namespace clipwarden::test;
namespace fs = std::filesystem;
using nlohmann::json;

namespace {

class ReviewServer : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    if (!have_tool("ffmpeg")) return;
    dir_ = new TempDir;
    std::string why;
    out_ = make_gate_folder(dir_->path(), 3, why);
    ASSERT_FALSE(out_.empty()) << why;
  }
  static void TearDownTestSuite() {
    delete dir_;
    dir_ = nullptr;
  }
  void SetUp() override {
    if (out_.empty()) GTEST_SKIP() << "ffmpeg is not installed";
  }
  static TempDir* dir_;
  static fs::path out_;
};
TempDir* ReviewServer::dir_ = nullptr;
fs::path ReviewServer::out_;

std::string first_key(const ReviewProcess& server) {
  auto queue = server.get("/api/queue", {{"X-Clipwarden-Token", server.token()}});
  const json j = json::parse(queue.body, nullptr, false);
  return j.is_object() && !j["clips"].empty() ? j["clips"][0]["key"].get<std::string>() : "";
}

}  // namespace

TEST_F(ReviewServer, ServesTheQueueAndTheClipWithTheToken) {
  ReviewProcess server(out_, dir_->path() / "log-serve");
  ASSERT_TRUE(server.ok()) << server.log();
  EXPECT_EQ(server.token().size(), 32u);
  const std::string t = "?token=" + server.token();
  auto page = server.get("/" + t);
  EXPECT_EQ(page.status, 200);
  EXPECT_NE(page.body.find("Review queue"), std::string::npos);
  EXPECT_NE(page.body.find("3 clips left to decide"), std::string::npos) << page.body.substr(0, 2000);
  // The page's only script and style are named by hash; nothing else may run.
  EXPECT_NE(page.headers["content-security-policy"].find("script-src 'sha256-"), std::string::npos);
  EXPECT_EQ(page.headers["content-security-policy"].find("unsafe"), std::string::npos);
  EXPECT_EQ(page.headers["x-content-type-options"], "nosniff");

  const std::string key = first_key(server);
  ASSERT_FALSE(key.empty());
  auto clip = server.get("/clip/" + key + t);
  EXPECT_EQ(clip.status, 200);
  EXPECT_NE(clip.body.find("<video"), std::string::npos);
  // The clip is served whole and in ranges (browsers seek with Range).
  auto video = server.get("/clip/" + key + "/video" + t);
  ASSERT_EQ(video.status, 200);
  const fs::path source = dir_->path() / "clips";
  bool same = false;
  for (const auto& f : fs::directory_iterator(source)) same = same || read_text(f.path()) == video.body;
  EXPECT_TRUE(same) << "the video is one of the clips, byte for byte";
  auto part = server.get("/clip/" + key + "/video" + t, {{"Range", "bytes=10-19"}});
  EXPECT_EQ(part.status, 206);
  EXPECT_EQ(part.body, video.body.substr(10, 10));
  auto strip = server.get("/clip/" + key + "/strip.jpg" + t);
  EXPECT_EQ(strip.status, 200);
  EXPECT_EQ(strip.body.substr(0, 3), std::string("\xFF\xD8\xFF", 3)) << "a JPEG";
  // The gate's report page keeps its own policy; the server's adds that
  // nothing loads from anywhere.
  auto report = server.get("/clip/" + key + "/report.html" + t);
  EXPECT_EQ(report.status, 200);
  EXPECT_NE(report.body.find("http-equiv=\"Content-Security-Policy\""), std::string::npos);
  EXPECT_EQ(report.headers["content-security-policy"].rfind("default-src 'none'", 0), 0u);
  EXPECT_EQ(server.stop(SIGINT), 0) << server.log();
  EXPECT_NE(read_text(dir_->path() / "log-serve" / "stderr").find("review: stopped"), std::string::npos);
}

TEST_F(ReviewServer, RefusesWhatItMust) {
  ReviewProcess server(out_, dir_->path() / "log-refuse");
  ASSERT_TRUE(server.ok()) << server.log();
  const std::string key = first_key(server);
  ASSERT_FALSE(key.empty());
  const std::string t = "?token=" + server.token();
  std::string wrong = server.token();
  wrong[0] = wrong[0] == 'a' ? 'b' : 'a';

  EXPECT_EQ(server.get("/").status, 401) << "no token";
  EXPECT_EQ(server.get("/clip/" + key + "/video").status, 401) << "no token";
  EXPECT_EQ(server.get("/?token=" + wrong).status, 403) << "wrong token";
  EXPECT_EQ(server.get("/", {{"X-Clipwarden-Token", wrong}}).status, 403) << "wrong token";
  // Another site's page: its Origin, or a DNS name rebound to 127.0.0.1.
  EXPECT_EQ(server.get("/" + t, {{"Origin", "http://evil.example"}}).status, 403);
  EXPECT_EQ(server.get("/" + t, {{"Sec-Fetch-Site", "cross-site"}}).status, 403);
  EXPECT_EQ(server.get("/" + t, {{"Host", "evil.example:" + std::to_string(server.port())}}).status, 400);
  // Paths outside what the queue names.
  for (const char* path : {"/../../../../etc/passwd", "/clip/../../etc/passwd", "/clip/%2e%2e%2f%2e%2e%2fetc%2fpasswd",
                           "/clip/99999/video", "/clip/0/../../queue.jsonl", "/queue.jsonl", "/clipwarden.db"}) {
    auto a = server.get(std::string(path) + t);
    EXPECT_EQ(a.status / 100, 4) << path;
    EXPECT_EQ(a.body.find("root:"), std::string::npos) << path;
  }
  // State changes: a GET never decides; a POST with the token only in the
  // query (what a form on another page could send) is refused too.
  const json body = {{"clip", key}, {"decision", "reject"}, {"request_id", "r1"}};
  EXPECT_EQ(server.get("/api/decide" + t + "&clip=" + key + "&decision=reject").status, 405);
  EXPECT_EQ(server.post("/api/decide" + t, body.dump()).status, 401);
  EXPECT_EQ(server.post("/api/decide", body.dump(),
                        {{"X-Clipwarden-Token", server.token()}, {"Origin", "http://evil.example"}})
                .status,
            403);
  auto decisions = server.get("/api/decisions" + t);
  EXPECT_EQ(decisions.status, 200);
  EXPECT_EQ(json::parse(decisions.body)["decisions"].size(), 0u) << "nothing was decided";
  EXPECT_EQ(server.stop(SIGTERM), 0) << server.log();
}

TEST_F(ReviewServer, ListensOnLoopbackOnlyAndWarnsOtherwise) {
  ReviewProcess server(out_, dir_->path() / "log-loopback");
  ASSERT_TRUE(server.ok()) << server.log();
  // /proc/net/tcp lists the listening socket's address: 0100007F is 127.0.0.1.
  char port_hex[8];
  std::snprintf(port_hex, sizeof port_hex, "%04X", server.port());
  const std::string tcp = read_text("/proc/net/tcp");
  EXPECT_NE(tcp.find("0100007F:" + std::string(port_hex)), std::string::npos);
  EXPECT_EQ(tcp.find("00000000:" + std::string(port_hex)), std::string::npos);
  EXPECT_EQ(server.stop(SIGINT), 0);

  // 192.0.2.1 (TEST-NET-1, RFC 5737) is no address of this machine: the
  // warning comes first, then the bind fails.
  auto warned = run_command({CLIPWARDEN_BINARY, "review", out_.string(), "--listen", "192.0.2.1", "--port", "0"});
  EXPECT_NE(warned.exit_code, 0);
  EXPECT_NE(warned.err.find("warning: listening on 192.0.2.1"), std::string::npos) << warned.err;
  auto not_gate = run_command({CLIPWARDEN_BINARY, "review", dir_->path().string(), "--port", "0"});
  EXPECT_EQ(not_gate.exit_code, 2);
  EXPECT_NE(not_gate.err.find("queue.jsonl"), std::string::npos) << not_gate.err;
}
