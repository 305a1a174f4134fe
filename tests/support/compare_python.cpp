#include "support/compare_python.h"

#include <sys/wait.h>
#include <unistd.h>

#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>

namespace clipwarden::test {

namespace {
constexpr const char* kPython = "/usr/bin/python3";

std::string read_pipe(FILE* pipe) {
  std::string out;
  char buffer[4096];
  size_t n;
  while ((n = std::fread(buffer, 1, sizeof buffer, pipe)) > 0) out.append(buffer, n);
  return out;
}
}  // namespace

TempFolder::TempFolder(const std::string& label) {
  std::string pattern =
      (std::filesystem::temp_directory_path() / ("clipwarden-" + label + "-XXXXXX")).string();
  if (::mkdtemp(pattern.data()) == nullptr) std::abort();
  path_ = pattern;
}

TempFolder::~TempFolder() {
  std::error_code ec;
  std::filesystem::remove_all(path_, ec);
}

std::optional<std::string> scipy_unavailable_reason() {
  static const std::optional<std::string> reason = []() -> std::optional<std::string> {
    if (::access(kPython, X_OK) != 0)
      return std::string(kPython) + " is not installed (Debian package python3)";
    const std::string cmd = std::string(kPython) + " -c 'import scipy.stats, numpy' 2>/dev/null";
    if (std::system(cmd.c_str()) != 0)
      return std::string("scipy is not importable by ") + kPython +
             " (Debian package python3-scipy)";
    return std::nullopt;
  }();
  return reason;
}

nlohmann::json run_python_json(const std::string& script, const nlohmann::json& input,
                               std::string& error) {
  TempFolder folder("py");
  {
    std::ofstream(folder.file("script.py")) << script;
    std::ofstream(folder.file("input.json")) << input.dump();
  }
  const std::string cmd =
      std::string(kPython) + " " + folder.file("script.py") + " " + folder.file("input.json");
  FILE* pipe = ::popen(cmd.c_str(), "r");
  if (!pipe) {
    error = "cannot start " + cmd;
    return nlohmann::json(nlohmann::json::value_t::discarded);
  }
  const std::string out = read_pipe(pipe);
  const int status = ::pclose(pipe);
  if (status != 0) {
    error = cmd + " failed with status " + std::to_string(status);
    return nlohmann::json(nlohmann::json::value_t::discarded);
  }
  auto parsed = nlohmann::json::parse(out, nullptr, false);
  if (parsed.is_discarded()) error = "python printed no JSON: " + out.substr(0, 200);
  return parsed;
}

}  // namespace clipwarden::test
