// framelint gate INPUT... --out DIR : the review queue. Only parses
// arguments; the batch is run by the library (include/framelint/gate.h).
#include <cstdio>
#include <cstdlib>

#include "analyzer/cli/args.h"
#include "analyzer/cli/command.h"
#include "analyzer/cli/gate_output.h"
#include "analyzer/cli/output_names.h"
#include "analyzer/cli/settings_args.h"
#include "framelint/gate.h"

namespace framelint::cli {
namespace {

std::vector<OptionSpec> gate_specs() {
  std::vector<OptionSpec> specs = analysis_option_specs();
  specs.push_back({"out", true, "output folder (required)"});
  specs.push_back({"db", true, "results store (default DIR/framelint.db); share one across runs"});
  specs.push_back({"jobs", true, "clips analysed at once (default: number of cores)"});
  specs.push_back(
      {"shard", true, "I/N: this job's share, I from 0; auto/N reads the scheduler's index"});
  specs.push_back({"fail-on", true, "review or reject (default): exit 1 when a clip gets it"});
  specs.push_back({"no-html", false, "write only the JSON reports"});
  specs.push_back({"print-default-policy", false, "print the built-in policy as JSON and exit"});
  specs.push_back({"quiet", false, "no progress and no summary line"});
  return specs;
}

const char* kDescription =
    "Judges every clip: INPUT is a clip, a folder (searched recursively for video files\n"
    "and folders of numbered frames) or a manifest (.jsonl: one {\"path\", \"id\", \"prompt_id\",\n"
    "\"model\", ...} per line). Writes a report per clip, DIR/queue.jsonl (one line per clip,\n"
    "input order) and DIR/index.html (worst first). Clips already analysed with the same\n"
    "content and settings are taken from the results store; a killed run resumes when the\n"
    "same command is run again.\n"
    "Exit status: 0 no clip failed the gate, 1 a clip reached --fail-on, 2 bad usage, policy\n"
    "or manifest, 3 a clip could not be read (outranks 1).";

// Names are given over the whole input list before sharding, so shard
// outputs never collide and merge can copy them as they are.
void assign_output_names(std::vector<GateInput>& inputs) {
  OutputNamer namer;
  for (auto& in : inputs) in.output_name = namer.unique_name(in.path);
}

}  // namespace

int run_gate(const std::vector<std::string>& args) {
  const auto specs = gate_specs();
  if (wants_help(args)) {
    std::fputs(format_help("gate", "INPUT... --out DIR [options]", kDescription, specs).c_str(),
               stdout);
    return kExitOk;
  }
  auto parsed = parse_args(args, specs);
  if (!parsed) return print_error(parsed.error().message()), kExitUsage;
  if (parsed->has("print-default-policy")) {
    std::printf("%s\n", policy_to_json(default_policy()).dump(2).c_str());
    return kExitOk;
  }
  if (parsed->positionals.empty())
    return print_error("gate needs at least one INPUT (see framelint gate --help)"), kExitUsage;
  if (!parsed->get("out"))
    return print_error("gate needs --out DIR (see framelint gate --help)"), kExitUsage;
  auto options = analysis_options_from_args(*parsed);
  if (!options) return print_error(options.error().message()), kExitUsage;
  auto jobs = parsed->get_int("jobs", 1, 1024);
  if (!jobs) return print_error(jobs.error().message()), kExitUsage;
  auto fail_on = fail_on_from_args(*parsed);
  if (!fail_on) return print_error(fail_on.error().message()), kExitUsage;
  std::optional<ShardSpec> shard;
  if (auto text = parsed->get("shard")) {
    auto spec = parse_shard(*text, [](const char* name) { return std::getenv(name); });
    if (!spec) return print_error(spec.error().message()), kExitUsage;
    shard = *spec;
  }
  auto collected = collect_inputs(parsed->positionals);
  if (!collected) return print_error(collected.error().message()), kExitUsage;
  for (const auto& w : collected->warnings) print_error(w);
  assign_output_names(collected->inputs);
  const std::vector<GateInput> inputs =
      shard ? select_shard(collected->inputs, *shard) : collected->inputs;

  GateOptions gate;
  gate.settings = options->settings;
  gate.policy = options->policy;
  gate.out_dir = *parsed->get("out");
  gate.db_path = parsed->get("db").value_or("");
  gate.jobs = jobs->value_or(0);
  const bool html = !parsed->has("no-html");
  gate.write_report = [html](const Report& r, const std::string& base) {
    return write_reports(r, base, html);
  };
  const bool quiet = parsed->has("quiet");
  BatchProgress progress(static_cast<int>(inputs.size()), quiet || !stderr_is_terminal());
  GateObserver observer;
  observer.on_clip_done = [&](const ClipResult& r, const GateCounts& counts) {
    if (r.error) progress.print_above(r.error->message());
    progress.update(counts);
  };
  auto run = framelint::run_gate(inputs, gate, observer);
  progress.finish();
  if (!run) return print_error(run.error().message()), kExitUsage;
  for (const auto& w : run->warnings) print_error(w);
  if (!quiet) {
    std::string line = "gate: " + std::to_string(run->counts.total) + " clips";
    if (shard)
      line += " (shard " + std::to_string(shard->index) + "/" + std::to_string(shard->count) + ")";
    std::printf("%s: %s -> %s/queue.jsonl\n", line.c_str(), summary_text(run->counts).c_str(),
                gate.out_dir.c_str());
  }
  return gate_exit_status(run->counts, *fail_on);
}

}  // namespace framelint::cli
