// A `clipwarden review` child for the review station's tests: a small gate
// output folder to serve, the server started on a free port, its printed
// address read back, and HTTP requests to it.
#pragma once

#include <filesystem>
#include <map>
#include <string>

#include <nlohmann/json.hpp>

namespace clipwarden::test {

// Makes `clips` short clips (make_varied_clips) under `root`/clips and runs
// `clipwarden gate` on them into `root`/out; returns the output folder, or
// "" with the reason in `why`.
std::filesystem::path make_gate_folder(const std::filesystem::path& root, int clips, std::string& why);

struct HttpAnswer {
  int status = 0;  // 0 when no answer came
  std::string body;
  std::map<std::string, std::string> headers;  // last value of each, lower-case names
};

class ReviewProcess {
 public:
  // Starts `clipwarden review dir --port 0` plus `extra`; waits (up to 60 s)
  // for the address line. ok() says whether it came.
  ReviewProcess(const std::filesystem::path& dir, const std::filesystem::path& logs,
                const std::vector<std::string>& extra = {});
  ~ReviewProcess();
  bool ok() const { return port_ > 0; }
  int port() const { return port_; }
  const std::string& token() const { return token_; }
  const std::string& url() const { return url_; }
  int pid() const { return pid_; }
  std::string log() const;

  // Sends `signal` and waits for the exit status (-1 when killed by it).
  int stop(int signal);

  // A request with the given headers ("Host" defaults to 127.0.0.1:port).
  HttpAnswer get(const std::string& path, const std::map<std::string, std::string>& headers = {}) const;
  HttpAnswer post(const std::string& path, const std::string& body,
                  const std::map<std::string, std::string>& headers = {}) const;
  // A decision POSTed as the page sends it (token in the header).
  HttpAnswer decide(const std::string& clip_key, const std::string& decision, const std::string& request_id,
                    const std::string& reviewer = "tester") const;

 private:
  std::filesystem::path logs_;
  int pid_ = -1;
  int port_ = 0;
  std::string token_, url_;
};

}  // namespace clipwarden::test
