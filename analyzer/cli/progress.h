// A one-line progress display on stderr, only on a terminal.
#pragma once

#include <chrono>
#include <cstdint>
#include <string>

namespace clipwarden::cli {

class ProgressLine {
 public:
  ProgressLine(std::string label, bool silent);
  void update(int64_t done, int64_t expected);
  void finish();

 private:
  std::string label_;
  bool silent_;
  bool drawn_ = false;
  std::chrono::steady_clock::time_point last_draw_{};
};

}  // namespace clipwarden::cli
