// What gate and merge share on the CLI side: the progress bar on stderr
// (only on a terminal: clips done of the total, the verdicts so far, time
// left), the summary line, --fail-on and the exit status.
#pragma once

#include <chrono>
#include <string>

#include "analyzer/cli/args.h"
#include "clipwarden/gate.h"

namespace clipwarden::cli {

class BatchProgress {
 public:
  BatchProgress(int total, bool silent);
  void update(const GateCounts& counts);
  // Prints a line above the bar (e.g. a clip's error) without garbling it.
  void print_above(const std::string& line);
  void finish();

 private:
  void draw(const GateCounts& counts);
  int total_;
  bool silent_;
  bool drawn_ = false;
  GateCounts last_;
  std::chrono::steady_clock::time_point start_;
  std::chrono::steady_clock::time_point last_draw_{};
};

// "12 pass / 3 review / 1 reject / 0 error (5 taken from the store)"
std::string summary_text(const GateCounts& counts);

// --fail-on review|reject (default reject).
Expected<Verdict> fail_on_from_args(const ParsedArgs& args);

// docs/cli.md: 3 if any clip could not be judged (outranks 1), 1 if any clip
// is at or above fail_on, else 0.
int gate_exit_status(const GateCounts& counts, Verdict fail_on);

}  // namespace clipwarden::cli
