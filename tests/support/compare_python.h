// Running a reference computation through Debian's Python (/usr/bin/python3
// with python3-scipy) from a test: the script and its JSON input go to
// temporary files, the script prints one JSON document on stdout.
#pragma once

#include <optional>
#include <string>

#include <nlohmann/json.hpp>

namespace clipwarden::test {

// Empty when /usr/bin/python3 and scipy are usable; otherwise the reason, for
// GTEST_SKIP.
std::optional<std::string> scipy_unavailable_reason();

// Runs `script` with the path of a file holding `input` as argv[1]; returns
// the parsed stdout, or a discarded json (is_discarded()) with the failure
// written to `error`.
nlohmann::json run_python_json(const std::string& script, const nlohmann::json& input,
                               std::string& error);

// A fresh empty folder under the system temporary folder, removed by the
// destructor.
class TempFolder {
 public:
  explicit TempFolder(const std::string& label);
  ~TempFolder();
  TempFolder(const TempFolder&) = delete;
  TempFolder& operator=(const TempFolder&) = delete;
  const std::string& path() const { return path_; }
  std::string file(const std::string& name) const { return path_ + "/" + name; }

 private:
  std::string path_;
};

}  // namespace clipwarden::test
