// Files for the gate's tests: a temporary folder removed at the end, small
// text files, and running the framelint binary as a child process.
#pragma once

#include <filesystem>
#include <string>
#include <vector>

namespace framelint::testing {

struct TempDir {
  explicit TempDir(const std::string& label);
  ~TempDir();
  TempDir(const TempDir&) = delete;
  TempDir& operator=(const TempDir&) = delete;
  std::filesystem::path path;
};

// Writes `text` to `path`, creating parent folders.
void write_text(const std::filesystem::path& path, const std::string& text);
std::string read_text(const std::filesystem::path& path);
// Lines of a text file, without the newline.
std::vector<std::string> read_lines(const std::filesystem::path& path);

struct RunResult {
  int exit_status = -1;  // -1 when the child did not exit normally
  std::string out;       // stdout
  std::string err;       // stderr
};

// Runs the program with arguments (no shell), waiting for it.
RunResult run_program(const std::vector<std::string>& argv);

// Starts the program in the background; stdout/stderr go to files in
// `log_dir`. Returns the child's pid.
int start_program(const std::vector<std::string>& argv, const std::filesystem::path& log_dir);

// True if `tool` is on PATH.
bool have_tool(const std::string& tool);

}  // namespace framelint::testing
