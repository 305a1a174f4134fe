// The CLI is a thin driver: each command parses its arguments and calls the
// library. Commands are listed in commands.cpp.
#pragma once

#include <functional>
#include <string>
#include <vector>

namespace framelint::cli {

// Exit statuses fixed by DESIGN.md.
enum ExitStatus : int {
  kExitOk = 0,
  kExitGateFailed = 1,
  kExitUsage = 2,
  kExitInputError = 3,
};

struct Command {
  const char* name;
  const char* summary;  // one line for `framelint --help`
  std::function<int(const std::vector<std::string>& args)> run;  // args after the name
};

const std::vector<Command>& commands();

// Shared output conventions: one line per error on stderr, prefixed with the
// program name; progress only when stderr is a terminal and not --quiet.
void print_error(const std::string& line);
bool stderr_is_terminal();

}  // namespace framelint::cli
