// clipwarden review DIR : the review station over a gate output folder
// (include/clipwarden/review.h); --export writes the decisions out instead.
#include <pthread.h>
#include <signal.h>

#include <cstdio>
#include <cstdlib>
#include <thread>

#include "analyzer/cli/args.h"
#include "analyzer/cli/command.h"
#include "clipwarden/review.h"

namespace clipwarden::cli {
namespace {

const char* kDescription =
    "Serves the review queue of a gate output folder DIR to a browser on this machine:\n"
    "the queue worst first, each clip playing with its timeline and flagged segments,\n"
    "and one-key decisions (keep, reject, second look) stored append-only in the results\n"
    "store. Prints the address to open, with its random access token; requests without\n"
    "the token are refused. Ctrl-C stops it (exit status 0).\n"
    "--export FILE writes every stored decision as JSON lines (\"-\" for stdout) and exits.";

std::string default_reviewer() {
  for (const char* name : {"CLIPWARDEN_REVIEWER", "USER", "LOGNAME"})
    if (const char* v = std::getenv(name); v && *v) return v;
  return "reviewer";
}

}  // namespace

int run_review(const std::vector<std::string>& args) {
  const std::vector<OptionSpec> specs = {
      {"port", true, "port to listen on (default 8765; 0 picks a free one)"},
      {"listen", true, "address to listen on (default 127.0.0.1; another exposes the queue: a warning says so)"},
      {"db", true, "results store holding the decisions (default DIR/clipwarden.db)"},
      {"reviewer", true, "name stored with decisions that name nobody (default $USER)"},
      {"export", true, "write the stored decisions to FILE as JSON lines and exit"},
  };
  int stop_status = kExitOk;
  auto parsed = parse_command_line(args, specs, {"review", "DIR [options]", kDescription}, stop_status);
  if (!parsed) return stop_status;
  if (parsed->positionals.size() != 1)
    return print_error("review needs one gate output folder DIR (see clipwarden review --help)"), kExitUsage;
  ReviewOptions options;
  options.dir = parsed->positionals[0];
  options.db_path = parsed->get("db").value_or(options.dir + "/clipwarden.db");
  if (auto out = parsed->get("export")) {
    auto n = export_decisions(options.db_path, *out);
    if (!n) return print_error(n.error().message()), kExitUsage;
    if (*out != "-") std::fprintf(stderr, "review: %d decisions -> %s\n", *n, out->c_str());
    return kExitOk;
  }
  auto port = parsed->get_int("port", 0, 65535);
  if (!port) return print_error(port.error().message()), kExitUsage;
  if (*port) options.port = **port;
  options.host = parsed->get("listen").value_or("127.0.0.1");
  options.reviewer = parsed->get("reviewer").value_or(default_reviewer());
  if (!is_loopback_host(options.host))
    print_error("warning: listening on " + options.host +
                ": anyone who can reach this address and learns the token can see the clips and decide");

  // SIGINT and SIGTERM are taken by one thread (sigwait), set up before the
  // server starts its own threads so none of them is interrupted.
  sigset_t stop_signals;
  sigemptyset(&stop_signals);
  sigaddset(&stop_signals, SIGINT);
  sigaddset(&stop_signals, SIGTERM);
  pthread_sigmask(SIG_BLOCK, &stop_signals, nullptr);

  auto server = ReviewServer::open(options);
  if (!server) {
    print_error(server.error().message());
    return server.error().kind == ErrorKind::output ? kExitInputError : kExitUsage;
  }
  int got = 0;
  std::thread waiter([&] {
    sigwait(&stop_signals, &got);
    (*server)->stop();
  });
  std::printf("review: %s (Ctrl-C stops)\n", (*server)->url().c_str());
  std::fflush(stdout);
  const Status ran = (*server)->run();
  if (got == 0) pthread_kill(waiter.native_handle(), SIGTERM);  // the server stopped by itself
  waiter.join();
  if (!ran) return print_error(ran.error().message()), kExitInputError;
  std::fprintf(stderr, "review: stopped\n");
  return kExitOk;
}

}  // namespace clipwarden::cli
