#include "support/compare_cli.h"

#include <sys/wait.h>

#include <cstdlib>
#include <fstream>
#include <sstream>

namespace clipwarden::test {

int run_compare(const std::string& arguments) {
  const std::string cmd =
      std::string(CLIPWARDEN_BINARY) + " compare " + arguments + " >/dev/null 2>&1";
  const int status = std::system(cmd.c_str());
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

std::string shell_quoted(const std::string& text) { return "'" + text + "'"; }

nlohmann::json read_json_file(const std::string& path) {
  std::ifstream in(path);
  return nlohmann::json::parse(in, nullptr, false);
}

std::string read_text_file(const std::string& path) {
  std::ifstream in(path);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

const nlohmann::json* find_compared(const nlohmann::json& compare, const std::string& metric,
                                    const std::string& statistic) {
  if (!compare.contains("metrics")) return nullptr;
  for (const auto& m : compare["metrics"])
    if (m["metric"] == metric && m["statistic"] == statistic) return &m;
  return nullptr;
}

}  // namespace clipwarden::test
