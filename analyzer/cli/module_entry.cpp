#include "analyzer/cli/module_entry.h"

#include <string>
#include <vector>

#include <opencv2/core/utility.hpp>

#include "analyzer/cli/command.h"
#include "analyzer/core/allocator_policy.h"

using namespace clipwarden::cli;

extern "C" __attribute__((visibility("default"))) int clipwarden_run_command(int argc,
                                                                             char** argv) {
  // clipwarden spreads the work over the cores itself (frame pairs in
  // analyze, clips in gate); OpenCV's own thread pool inside each DIS and
  // remap call only oversubscribes them: at 1080p on 2 cores it cost 14%
  // more CPU per frame and 13% more wall time (clipwarden_bench). See
  // include/clipwarden/analysis.h.
  cv::setNumThreads(1);
  // Freed frame-sized buffers stay in the process for the next frame and
  // the next clip instead of going back to the kernel (allocator_policy.h).
  clipwarden::keep_freed_buffers_for_reuse();
  const std::vector<std::string> args(argv, argv + argc);
  for (const auto& c : commands())
    if (!args.empty() && args[0] == c.name) return c.run({args.begin() + 1, args.end()});
  print_error("unknown command '" + (args.empty() ? std::string() : args[0]) +
              "' (see clipwarden --help)");
  return kExitUsage;
}
