#include "support/review_server.h"

#include <httplib.h>
#include <signal.h>

#include <chrono>
#include <regex>
#include <thread>

#include "support/clips.h"
#include "support/gate_files.h"

namespace clipwarden::test {
namespace fs = std::filesystem;

fs::path make_gate_folder(const fs::path& root, int clips, std::string& why) {
  why = make_varied_clips(root / "clips", clips);
  if (!why.empty()) return {};
  const fs::path out = root / "out";
  auto gate = run_command({CLIPWARDEN_BINARY, "gate", (root / "clips").string(), "--out", out.string(), "--jobs",
                           "1", "--threads", "1", "--width", "160", "--quiet"});
  if (gate.exit_code != 0 && gate.exit_code != 1) {
    why = "gate failed: " + gate.err;
    return {};
  }
  return out;
}

ReviewProcess::ReviewProcess(const fs::path& dir, const fs::path& logs, const std::vector<std::string>& extra)
    : logs_(logs) {
  std::vector<std::string> argv = {CLIPWARDEN_BINARY, "review", dir.string(), "--port", "0"};
  argv.insert(argv.end(), extra.begin(), extra.end());
  pid_ = start_program(argv, logs);
  if (pid_ < 0) return;
  const std::regex line(R"(review: (http://127\.0\.0\.1:(\d+)/\?token=([0-9a-f]+)))");
  for (int i = 0; i < 600; ++i) {
    std::smatch m;
    const std::string out = read_text(logs / "stdout");
    if (std::regex_search(out, m, line)) {
      url_ = m[1];
      port_ = std::stoi(m[2]);
      token_ = m[3];
      return;
    }
    std::this_thread::sleep_for(std::chrono::milliseconds(100));
  }
}

ReviewProcess::~ReviewProcess() {
  if (pid_ > 0) stop(SIGKILL);
}

std::string ReviewProcess::log() const {
  return "stdout: " + read_text(logs_ / "stdout") + "\nstderr: " + read_text(logs_ / "stderr");
}

int ReviewProcess::stop(int signal) {
  if (pid_ <= 0) return -1;
  kill(pid_, signal);
  const int status = wait_program(pid_);
  pid_ = -1;
  return status;
}

namespace {

HttpAnswer answer_of(const httplib::Result& r) {
  HttpAnswer a;
  if (!r) return a;
  a.status = r->status;
  a.body = r->body;
  for (const auto& [k, v] : r->headers) {
    std::string key = k;
    for (char& c : key) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    a.headers[key] = v;
  }
  return a;
}

httplib::Headers headers_for(int port, const std::map<std::string, std::string>& given) {
  httplib::Headers h;
  bool host = false;
  for (const auto& [k, v] : given) {
    h.emplace(k, v);
    host = host || k == "Host";
  }
  if (!host) h.emplace("Host", "127.0.0.1:" + std::to_string(port));
  return h;
}

}  // namespace

HttpAnswer ReviewProcess::get(const std::string& path, const std::map<std::string, std::string>& headers) const {
  httplib::Client client("127.0.0.1", port_);
  client.set_read_timeout(120, 0);
  return answer_of(client.Get(path, headers_for(port_, headers)));
}

HttpAnswer ReviewProcess::post(const std::string& path, const std::string& body,
                               const std::map<std::string, std::string>& headers) const {
  httplib::Client client("127.0.0.1", port_);
  client.set_read_timeout(120, 0);
  return answer_of(client.Post(path, headers_for(port_, headers), body, "application/json"));
}

HttpAnswer ReviewProcess::decide(const std::string& clip_key, const std::string& decision,
                                 const std::string& request_id, const std::string& reviewer) const {
  const nlohmann::json body = {{"clip", clip_key}, {"decision", decision}, {"request_id", request_id},
                               {"reviewer", reviewer}, {"tags", {"flicker"}}, {"note", ""}};
  return post("/api/decide", body.dump(), {{"X-Clipwarden-Token", token_}});
}

}  // namespace clipwarden::test
