#include "support/robust_run.h"

#include <signal.h>
#include <sys/wait.h>

#include <chrono>
#include <fstream>
#include <random>
#include <sstream>
#include <thread>

#include "support/gate_files.h"

namespace clipwarden::test {
namespace fs = std::filesystem;

std::string BoundedRun::outcome() const {
  if (timed_out) return "hang";
  if (signal != 0) return "signal " + std::to_string(signal);
  return "exit " + std::to_string(exit_code);
}

BoundedRun run_bounded(const std::vector<std::string>& argv, const fs::path& log_dir,
                       double limit_s) {
  BoundedRun run;
  const auto start = std::chrono::steady_clock::now();
  const int pid = start_program(argv, log_dir);
  if (pid <= 0) return run;
  int status = 0;
  for (;;) {
    const pid_t done = waitpid(pid, &status, WNOHANG);
    if (done == pid) break;
    const double elapsed =
        std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    if (done < 0 && errno != EINTR) return run;
    if (elapsed > limit_s && !run.timed_out) {
      run.timed_out = true;
      kill(pid, SIGKILL);
    }
    std::this_thread::sleep_for(std::chrono::milliseconds(run.timed_out ? 5 : 20));
  }
  run.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  if (WIFEXITED(status)) run.exit_code = WEXITSTATUS(status);
  if (WIFSIGNALED(status)) run.signal = WTERMSIG(status);
  run.out = read_text(log_dir / "stdout");
  run.err = read_text(log_dir / "stderr");
  return run;
}

std::string read_bytes(const fs::path& path) { return read_text(path); }

void write_bytes(const fs::path& path, const std::string& bytes) { write_text(path, bytes); }

void flip_random_bits(std::string& bytes, size_t first, size_t last, int count, uint32_t seed) {
  last = std::min(last, bytes.size());
  if (first >= last) return;
  std::mt19937 rng(seed);
  std::uniform_int_distribution<size_t> pos(first, last - 1);
  std::uniform_int_distribution<int> bit(0, 7);
  for (int i = 0; i < count; ++i) {
    const int b = bit(rng);  // drawn first: the order fixes which bytes a seed breaks
    bytes[pos(rng)] ^= static_cast<char>(1 << b);
  }
}

bool replace_first(std::string& bytes, const std::string& from, const std::string& to) {
  const size_t at = bytes.find(from);
  if (at == std::string::npos) return false;
  bytes.replace(at, from.size(), to);
  return true;
}

}  // namespace clipwarden::test
