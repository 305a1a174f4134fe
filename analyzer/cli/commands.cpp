#include <unistd.h>

#include <cstdio>

#include "analyzer/cli/command.h"

namespace clipwarden::cli {

// Each command lives in its own file; one line here registers it.
int run_analyze(const std::vector<std::string>& args);
int run_compare(const std::vector<std::string>& args);
int run_probe(const std::vector<std::string>& args);
int run_gate(const std::vector<std::string>& args);
int run_merge(const std::vector<std::string>& args);
int run_inspect(const std::vector<std::string>& args);
int run_inject(const std::vector<std::string>& args);

const std::vector<Command>& commands() {
  static const std::vector<Command> table = {
      {"analyze", "analyze clips; write a JSON and an HTML report per clip", run_analyze},
      {"probe", "print what a clip's container holds, as JSON", run_probe},
      {"gate", "judge a batch of clips into a review queue (queue.jsonl, index.html)", run_gate},
      {"merge", "join the outputs of gate shards into one queue", run_merge},
      {"inspect", "write PNG panels (flow, warp, error, occlusion) for one frame", run_inspect},
      {"compare", "compare two model versions on the same prompts, with paired statistics",
       run_compare},
      {"inject", "write a copy of a clip with known defects, and where they are", run_inject},
  };
  return table;
}

void print_error(const std::string& line) { std::fprintf(stderr, "clipwarden: %s\n", line.c_str()); }

bool stderr_is_terminal() { return isatty(2) == 1; }

std::optional<ParsedArgs> parse_command_line(const std::vector<std::string>& args,
                                             const std::vector<OptionSpec>& specs,
                                             const CommandHelp& help, int& exit_status) {
  if (wants_help(args)) {
    std::fputs(format_help(help.name, help.synopsis, help.description, specs).c_str(), stdout);
    exit_status = kExitOk;
    return std::nullopt;
  }
  auto parsed = parse_args(args, specs);
  if (!parsed) {
    print_error(parsed.error().message());
    exit_status = kExitUsage;
    return std::nullopt;
  }
  return std::move(*parsed);
}

}  // namespace clipwarden::cli
