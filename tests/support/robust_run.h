// Running the built CLI on inputs that may make it misbehave: a child with a
// time limit (killed when it runs over, reported as a hang), its exit status
// or the signal that ended it, and its captured output. Also the byte
// surgery used to break clips on purpose.
#pragma once

#include <cstdint>
#include <filesystem>
#include <string>
#include <vector>

namespace clipwarden::test {

struct BoundedRun {
  int exit_code = -1;      // the exit status when the child exited normally, else -1
  int signal = 0;          // the signal that ended it (0 when it exited)
  bool timed_out = false;  // killed by us after the time limit: a hang
  double seconds = 0;      // wall time
  std::string out, err;
  // "exit N", "signal N" or "hang".
  std::string outcome() const;
};

// Runs argv (no shell) with stdout/stderr captured in `log_dir`; kills the
// child with SIGKILL after `limit_s` seconds.
BoundedRun run_bounded(const std::vector<std::string>& argv, const std::filesystem::path& log_dir,
                       double limit_s);

std::string read_bytes(const std::filesystem::path& path);
void write_bytes(const std::filesystem::path& path, const std::string& bytes);

// Flips `count` random bits in bytes [first, last) of `bytes`, positions
// drawn from a std::mt19937 seeded with `seed` (reproducible).
void flip_random_bits(std::string& bytes, size_t first, size_t last, int count, uint32_t seed);

// Replaces the first occurrence of `from` by `to` (same or other length);
// false when `from` does not occur.
bool replace_first(std::string& bytes, const std::string& from, const std::string& to);

}  // namespace clipwarden::test
