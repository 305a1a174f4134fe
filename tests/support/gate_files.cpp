#include "support/gate_files.h"

#include "support/clips.h"

#include <fcntl.h>
#include <spawn.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cerrno>
#include <fstream>
#include <sstream>

extern char** environ;

namespace clipwarden::test {
namespace fs = std::filesystem;

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

int start_program(const std::vector<std::string>& argv, const fs::path& log_dir) {
  fs::create_directories(log_dir);
  const std::string out = (log_dir / "stdout").string(), err = (log_dir / "stderr").string();
  posix_spawn_file_actions_t actions;
  posix_spawn_file_actions_init(&actions);
  posix_spawn_file_actions_addopen(&actions, 0, "/dev/null", O_RDONLY, 0);
  posix_spawn_file_actions_addopen(&actions, 1, out.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
  posix_spawn_file_actions_addopen(&actions, 2, err.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
  std::vector<char*> args;
  for (const auto& a : argv) args.push_back(const_cast<char*>(a.c_str()));
  args.push_back(nullptr);
  pid_t pid = -1;
  if (posix_spawnp(&pid, args[0], &actions, nullptr, args.data(), environ) != 0) pid = -1;
  posix_spawn_file_actions_destroy(&actions);
  return pid;
}

int wait_program(int pid) {
  int status = 0;
  while (waitpid(pid, &status, 0) < 0)
    if (errno != EINTR) return -1;
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

std::string make_varied_clips(const fs::path& dir, int n, const std::string& stem) {
  fs::create_directories(dir);
  for (int i = 0; i < n; ++i) {
    const std::string out = (dir / (stem + "_" + std::to_string(i) + ".mp4")).string();
    std::string err =
        make_lavfi_clip(out, "testsrc2=size=160x120:rate=12:duration=1",
                        {"-vf", "hue=h=" + std::to_string(i * 37 % 360), "-pix_fmt", "yuv420p"});
    if (!err.empty()) return err;
  }
  return "";
}

}  // namespace clipwarden::test
