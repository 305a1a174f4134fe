// clipwarden merge DIR... --out DIR : joins the outputs of gate shards.
#include <cstdio>

#include "analyzer/cli/args.h"
#include "analyzer/cli/command.h"
#include "analyzer/cli/gate_output.h"
#include "clipwarden/gate.h"

namespace clipwarden::cli {

int run_merge(const std::vector<std::string>& args) {
  const std::vector<OptionSpec> specs = {
      {"out", true, "merged output folder (required; not one of the inputs)"},
      {"fail-on", true, "review or reject (default): exit 1 when a merged clip has it"},
      {"quiet", false, "no summary line"},
  };
  int stop_status = kExitOk;
  auto parsed = parse_command_line(
      args, specs,
      {"merge", "DIR... --out DIR [options]",
       "Joins the output folders of `clipwarden gate --shard` runs: one queue.jsonl in\n"
       "input order without duplicates, the reports, one clipwarden.db and index.html.\n"
       "Shard folders must be every shard 0..N-1 of one input list, each finished.\n"
       "Exit status as for gate: 0, 1 (a clip reached --fail-on), 2 bad usage or a\n"
       "shard missing or unfinished (named), 3 a clip could not be read."},
      stop_status);
  if (!parsed) return stop_status;
  if (parsed->positionals.empty() || !parsed->get("out"))
    return print_error("merge needs DIR... and --out DIR (see clipwarden merge --help)"), kExitUsage;
  auto fail_on = fail_on_from_args(*parsed);
  if (!fail_on) return print_error(fail_on.error().message()), kExitUsage;
  auto run = merge_gate_outputs(parsed->positionals, *parsed->get("out"));
  if (!run)
    return print_error(run.error().message()),
           run.error().kind == ErrorKind::input ? kExitInputError : kExitUsage;
  for (const auto& w : run->warnings) print_error(w);
  if (!parsed->has("quiet"))
    std::printf("merge: %d clips: %s -> %s/queue.jsonl\n", run->counts.total,
                summary_text(run->counts).c_str(), parsed->get("out")->c_str());
  return gate_exit_status(run->counts, *fail_on);
}

}  // namespace clipwarden::cli
