// The CLI is a thin driver: each command parses its arguments and calls the
// library. Commands are listed in commands.cpp.
#pragma once

#include <cstdio>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "analyzer/cli/args.h"

namespace clipwarden::cli {

// Exit statuses, as docs/cli.md states them (CliDocs checks the table).
enum ExitStatus : int {
  kExitOk = 0,
  kExitGateFailed = 1,
  kExitUsage = 2,
  kExitInputError = 3,
};

struct Command {
  const char* name;
  const char* summary;                                           // one line for `clipwarden --help`
  std::function<int(const std::vector<std::string>& args)> run;  // args after the name
};

const std::vector<Command>& commands();

// Shared output conventions: one line per error on stderr, prefixed with the
// program name; progress only when stderr is a terminal and not --quiet.
inline void print_error(const std::string& line) { std::fprintf(stderr, "clipwarden: %s\n", line.c_str()); }
bool stderr_is_terminal();

// How a command describes itself in --help.
struct CommandHelp {
  const char* name;
  const char* synopsis;
  std::string description;
};

// What every command does first: with -h or --help it prints the help and
// stops with status 0; a bad argument prints its one-line error and stops
// with status 2. Returns the parsed arguments, or nothing with
// `exit_status` set when the command is to stop.
std::optional<ParsedArgs> parse_command_line(const std::vector<std::string>& args,
                                             const std::vector<OptionSpec>& specs,
                                             const CommandHelp& help, int& exit_status);

}  // namespace clipwarden::cli
