#include "support/gate_files.h"

#include <fcntl.h>
#include <spawn.h>
#include <sys/wait.h>
#include <unistd.h>

#include <fstream>
#include <random>
#include <sstream>

extern char** environ;

namespace framelint::testing {
namespace fs = std::filesystem;

TempDir::TempDir(const std::string& label) {
  std::random_device rd;
  path = fs::temp_directory_path() / ("framelint-" + label + "-" + std::to_string(getpid()) + "-" +
                                      std::to_string(rd()));
  fs::create_directories(path);
}

TempDir::~TempDir() {
  std::error_code ec;
  fs::remove_all(path, ec);
}

void write_text(const fs::path& path, const std::string& text) {
  if (path.has_parent_path()) fs::create_directories(path.parent_path());
  std::ofstream(path, std::ios::binary) << text;
}

std::string read_text(const fs::path& path) {
  std::ifstream in(path, std::ios::binary);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

std::vector<std::string> read_lines(const fs::path& path) {
  std::ifstream in(path, std::ios::binary);
  std::vector<std::string> lines;
  for (std::string line; std::getline(in, line);)
    if (!line.empty()) lines.push_back(line);
  return lines;
}

namespace {

int spawn(const std::vector<std::string>& argv, const std::string& out_path, const std::string& err_path) {
  posix_spawn_file_actions_t actions;
  posix_spawn_file_actions_init(&actions);
  posix_spawn_file_actions_addopen(&actions, 1, out_path.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
  posix_spawn_file_actions_addopen(&actions, 2, err_path.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
  std::vector<char*> args;
  for (const auto& a : argv) args.push_back(const_cast<char*>(a.c_str()));
  args.push_back(nullptr);
  pid_t pid = -1;
  if (posix_spawnp(&pid, args[0], &actions, nullptr, args.data(), environ) != 0) pid = -1;
  posix_spawn_file_actions_destroy(&actions);
  return pid;
}

}  // namespace

RunResult run_program(const std::vector<std::string>& argv) {
  TempDir logs("run");
  const std::string out = (logs.path / "out").string(), err = (logs.path / "err").string();
  RunResult r;
  const int pid = spawn(argv, out, err);
  if (pid > 0) {
    int status = 0;
    while (waitpid(pid, &status, 0) < 0 && errno == EINTR) {
    }
    if (WIFEXITED(status)) r.exit_status = WEXITSTATUS(status);
  }
  r.out = read_text(out);
  r.err = read_text(err);
  return r;
}

int start_program(const std::vector<std::string>& argv, const fs::path& log_dir) {
  fs::create_directories(log_dir);
  return spawn(argv, (log_dir / "stdout").string(), (log_dir / "stderr").string());
}

bool have_tool(const std::string& tool) {
  return run_program({"sh", "-c", "command -v " + tool + " >/dev/null 2>&1"}).exit_status == 0;
}

}  // namespace framelint::testing
