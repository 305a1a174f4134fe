// clipwarden gate INPUT... --out DIR : the review queue. Only parses
// arguments; the batch is run by the library (include/clipwarden/gate.h).
#include <signal.h>
#include <unistd.h>

#include <atomic>
#include <cstdio>
#include <cstdlib>
#include <thread>

#include "analyzer/cli/args.h"
#include "analyzer/cli/command.h"
#include "analyzer/cli/gate_output.h"
#include "analyzer/cli/output_names.h"
#include "analyzer/cli/settings_args.h"
#include "clipwarden/gate.h"

namespace clipwarden::cli {
namespace {

std::vector<OptionSpec> gate_specs() {
  std::vector<OptionSpec> specs = analysis_option_specs();
  specs.push_back({"out", true, "output folder (required)"});
  specs.push_back({"db", true, "results store (default DIR/clipwarden.db); share one across runs"});
  specs.push_back({"jobs", true, "clips analysed at once (default: number of cores)"});
  specs.push_back(
      {"shard", true, "I/N: this job's share, I from 0; auto/N reads the scheduler's index"});
  specs.push_back({"fail-on", true, "review or reject (default): exit 1 when a clip gets it"});
  specs.push_back({"no-html", false, "write only the JSON reports"});
  specs.push_back(
      {"allow-empty", false, "an input list with no clips is not an error (exit 0, empty queue)"});
  specs.push_back({"print-default-policy", false, "print the built-in policy as JSON and exit"});
  specs.push_back({"quiet", false, "no progress and no summary line"});
  return specs;
}

const char* kGateDescription =
    "Judges every clip: INPUT is a clip, a folder (searched recursively for video files\n"
    "and folders of numbered frames) or a manifest (.jsonl: one {\"path\", \"id\", \"prompt_id\",\n"
    "\"model\", ...} per line). Writes a report per clip, DIR/queue.jsonl (one line per clip,\n"
    "input order) and DIR/index.html (worst first). Clips already analysed with the same\n"
    "content and settings are taken from the results store; a killed run resumes when the\n"
    "same command is run again.\n"
    "Exit status: 0 no clip failed the gate, 1 a clip reached --fail-on, 2 bad usage, policy\n"
    "or manifest, 3 a clip could not be read (outranks 1).\n"
    "Interrupting (SIGINT, SIGTERM): no new clip starts, clips in flight get 5 s to finish,\n"
    "the queue of finished clips is written, and the exit status is 130 (SIGINT) or 143\n"
    "(SIGTERM); a second signal exits at once. Rerun the same command to finish the batch.";

// SIGINT/SIGTERM: the first asks the batch to stop (the library watches the
// flag); a second one exits at once, which is as safe as kill -9 (reports
// are renamed into place whole, store rows are single transactions).
std::atomic<bool> g_stop{false};
std::atomic<int> g_stop_signal{0};
static_assert(std::atomic<bool>::is_always_lock_free, "the flag is set in a signal handler");

extern "C" void on_stop_signal(int sig) {
  if (g_stop.exchange(true)) _exit(128 + sig);
  g_stop_signal.store(sig);  // read only after run_gate returns
}

void install_stop_handlers() {
  struct sigaction sa {};
  sa.sa_handler = on_stop_signal;
  sigemptyset(&sa.sa_mask);
  sa.sa_flags = SA_RESTART;  // reads and writes in the workers carry on
  sigaction(SIGINT, &sa, nullptr);
  sigaction(SIGTERM, &sa, nullptr);
}

// Names are given over the whole input list before sharding, so shard
// outputs never collide and merge can copy them as they are.
void assign_output_names(std::vector<GateInput>& inputs) {
  OutputNamer namer;
  for (auto& in : inputs) in.output_name = namer.unique_name(in.path);
}

}  // namespace

int run_gate(const std::vector<std::string>& args) {
  // First of all: a signal that comes while the inputs are still being
  // listed must stop the batch cleanly too, not kill it.
  install_stop_handlers();
  const auto specs = gate_specs();
  int stop_status = kExitOk;
  auto parsed = parse_command_line(
      args, specs, {"gate", "INPUT... --out DIR [options]", kGateDescription}, stop_status);
  if (!parsed) return stop_status;
  if (parsed->has("print-default-policy")) {
    std::printf("%s\n", policy_to_json(default_policy()).dump(2).c_str());
    return kExitOk;
  }
  if (parsed->positionals.empty())
    return print_error("gate needs at least one INPUT (see clipwarden gate --help)"), kExitUsage;
  if (!parsed->get("out"))
    return print_error("gate needs --out DIR (see clipwarden gate --help)"), kExitUsage;
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
  // A CI job must not pass having checked nothing (an empty folder, a
  // manifest with no lines, a glob that matched nothing).
  if (collected->inputs.empty() && !parsed->has("allow-empty"))
    return print_error("gate: the inputs hold no clips (--allow-empty accepts an empty batch)"),
           kExitUsage;
  assign_output_names(collected->inputs);
  const std::vector<GateInput> inputs =
      shard ? select_shard(collected->inputs, *shard) : collected->inputs;

  GateOptions gate;
  gate.settings = options->settings;
  gate.policy = options->policy;
  gate.out_dir = *parsed->get("out");
  gate.db_path = parsed->get("db").value_or("");
  gate.jobs = jobs->value_or(0);
  // More clips at once than the machine has cores only adds memory and
  // contention (each analysis already keeps a core busy).
  const int max_jobs = 2 * static_cast<int>(std::max(1u, std::thread::hardware_concurrency()));
  if (gate.jobs > max_jobs) {
    print_error("gate: --jobs " + std::to_string(gate.jobs) + " is more than twice the " +
                std::to_string(max_jobs / 2) + " cores; using " + std::to_string(max_jobs));
    gate.jobs = max_jobs;
  }
  if (shard) gate.shard = shard_record(collected->inputs, *shard);
  const bool html = !parsed->has("no-html");
  gate.collect_thumbnails = html;
  gate.write_report = [html](const Report& r, const std::string& base,
                             const std::vector<Thumbnail>* thumbnails) {
    ReportExtras extras;
    extras.thumbnails = thumbnails;
    return write_reports(r, base, html, extras);
  };
  const bool quiet = parsed->has("quiet");
  BatchProgress progress(static_cast<int>(inputs.size()), quiet || !stderr_is_terminal());
  GateObserver observer;
  observer.on_clip_done = [&](const ClipResult& r, const GateCounts& counts) {
    if (r.error) progress.print_above(r.error->message());
    progress.update(counts);
  };
  gate.stop = &g_stop;
  auto run = clipwarden::run_gate(inputs, gate, observer);
  progress.finish();
  if (!run) return print_error(run.error().message()), kExitUsage;
  if (run->stopped) {
    const int sig = g_stop_signal.load();
    print_error("gate: stopped by " + std::string(sig == SIGINT ? "SIGINT" : "SIGTERM") +
                " after " + std::to_string(run->counts.total) + " of " +
                std::to_string(inputs.size()) + " clips (" + std::to_string(run->abandoned) +
                " abandoned in flight); " + gate.out_dir +
                "/queue.jsonl holds the finished ones; run the same command again to finish");
    std::fflush(stdout);
    std::fflush(stderr);
    // Abandoned workers still run: leave without running destructors under them.
    std::_Exit(128 + sig);
  }
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

}  // namespace clipwarden::cli
