// clipwarden probe CLIP: the container facts as JSON on stdout.
#include <cstdio>

#include "analyzer/cli/args.h"
#include "analyzer/cli/command.h"
#include "analyzer/core/byte_text.h"
#include "clipwarden/clip_source.h"

namespace clipwarden::cli {

int run_probe(const std::vector<std::string>& args) {
  const std::vector<OptionSpec> specs = {
      {"fps", true, "frame rate for a folder of numbered images"},
  };
  int stop_status = kExitOk;
  auto parsed = parse_command_line(
      args, specs, {"probe", "CLIP", "Prints what the clip's container holds, as JSON."},
      stop_status);
  if (!parsed) return stop_status;
  if (parsed->positionals.size() != 1) {
    print_error("probe takes exactly one CLIP (see clipwarden probe --help)");
    return kExitUsage;
  }
  auto fps = parsed->get_double("fps", 0.001, 1000);
  if (!fps) {
    print_error(fps.error().message());
    return kExitUsage;
  }
  SourceOptions options;
  options.folder_fps = *fps;
  auto facts = probe_clip(parsed->positionals[0], options);
  if (!facts) {
    print_error(facts.error().message());
    return kExitInputError;
  }
  std::printf("%s\n", dump_json(*facts, 2).c_str());
  return kExitOk;
}

}  // namespace clipwarden::cli
