#include <unistd.h>

#include <cstdio>
#include <map>
#include <string_view>

#include "analyzer/cli/command.h"
#include "analyzer/cli/command_names.h"

namespace clipwarden::cli {

// Each command lives in its own file; one line here and one in
// command_names.h register it.
int run_analyze(const std::vector<std::string>& args);
int run_compare(const std::vector<std::string>& args);
int run_probe(const std::vector<std::string>& args);
int run_gate(const std::vector<std::string>& args);
int run_merge(const std::vector<std::string>& args);
int run_inspect(const std::vector<std::string>& args);
int run_inject(const std::vector<std::string>& args);
int run_metrics(const std::vector<std::string>& args);
int run_review(const std::vector<std::string>& args);
int run_calibrate(const std::vector<std::string>& args);

const std::vector<Command>& commands() {
  static const std::vector<Command> table = [] {
    const std::map<std::string_view, std::function<int(const std::vector<std::string>&)>> runs = {
        {"analyze", run_analyze}, {"probe", run_probe},     {"gate", run_gate},
        {"merge", run_merge},     {"inspect", run_inspect}, {"compare", run_compare},
        {"inject", run_inject},   {"metrics", run_metrics}, {"review", run_review}, {"calibrate", run_calibrate},
    };
    std::vector<Command> commands;
    for (const CommandName& c : kCommandNames)
      commands.push_back({c.name, c.summary, runs.at(c.name)});
    return commands;
  }();
  return table;
}

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
