// clipwarden: checks generated video clips for temporal incoherence.
#include <cstdio>
#include <string>
#include <vector>

#include <opencv2/core/utility.hpp>

#include "analyzer/cli/command.h"
#include "clipwarden/version.h"

using namespace clipwarden::cli;

namespace {
void print_usage() {
  std::printf("usage: clipwarden COMMAND [ARGS...]\n\ncommands:\n");
  for (const auto& c : commands()) std::printf("  %-9s %s\n", c.name, c.summary);
  std::printf("\n`clipwarden COMMAND --help` describes a command; `clipwarden --version` prints the version.\n");
}
}  // namespace

int main(int argc, char** argv) {
  // clipwarden spreads the work over the cores itself (frame pairs in
  // analyze, clips in gate); OpenCV's own thread pool inside each DIS and
  // remap call only oversubscribes them: at 1080p on 2 cores it cost 14%
  // more CPU per frame and 13% more wall time (clipwarden_bench). See
  // include/clipwarden/analysis.h.
  cv::setNumThreads(1);
  std::vector<std::string> args(argv + 1, argv + argc);
  if (args.empty() || args[0] == "--help" || args[0] == "-h" || args[0] == "help") {
    print_usage();
    return args.empty() ? kExitUsage : kExitOk;
  }
  if (args[0] == "--version") {
    std::printf("clipwarden %s\n", clipwarden::version());
    return kExitOk;
  }
  for (const auto& c : commands()) {
    if (args[0] == c.name) return c.run({args.begin() + 1, args.end()});
  }
  print_error("unknown command '" + args[0] + "' (see clipwarden --help)");
  return kExitUsage;
}
