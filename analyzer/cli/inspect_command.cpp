// clipwarden inspect CLIP --frame N: the panels of one frame as PNG files.
#include <cstdio>

#include "analyzer/cli/args.h"
#include "analyzer/cli/command.h"
#include "analyzer/cli/output_names.h"
#include "analyzer/cli/settings_args.h"
#include "clipwarden/inspect.h"

namespace clipwarden::cli {

int run_inspect(const std::vector<std::string>& args) {
  const std::vector<OptionSpec> specs = {
      {"frame", true, "index of the frame to inspect (0-based decode order, as in the report)"},
      {"out", true, "output folder (default clipwarden-out)"},
      {"preset", true, "optical flow effort: fast, balanced (default) or thorough"},
      {"width", true, "long side of the analysis frames in px (default 512)"},
      {"fps", true, "frame rate for folders of numbered images (default 24)"},
  };
  int stop_status = kExitOk;
  auto parsed = parse_command_line(
      args, specs,
      {"inspect", "CLIP --frame N [options]",
       "Writes PNG panels for one frame: previous, current, previous warped onto\n"
       "current, warp-error heat map and its colour bar, optical flow in the\n"
       "Middlebury colour coding and its colour wheel, occlusion mask.\n"
       "Prints the paths written, one per line."},
      stop_status);
  if (!parsed) return stop_status;
  if (parsed->positionals.size() != 1) {
    print_error("inspect takes exactly one CLIP (see clipwarden inspect --help)");
    return kExitUsage;
  }
  auto frame = parsed->get_int("frame", 0, 1 << 30);
  if (!frame) {
    print_error(frame.error().message());
    return kExitUsage;
  }
  if (!*frame) {
    print_error("inspect needs --frame N (see clipwarden inspect --help)");
    return kExitUsage;
  }
  auto options = analysis_options_from_args(*parsed);
  if (!options) {
    print_error(options.error().message());
    return kExitUsage;
  }
  const std::string& clip = parsed->positionals[0];
  auto panels = inspect_frame(clip, **frame, options->settings);
  if (!panels) {
    print_error(panels.error().message());
    return panels.error().kind == ErrorKind::usage ? kExitUsage : kExitInputError;
  }
  const std::string out_dir = parsed->get("out").value_or("clipwarden-out");
  auto paths = write_panel_pngs(*panels, out_dir, safe_stem(clip));
  if (!paths) {
    print_error(paths.error().message());
    return kExitInputError;
  }
  for (const auto& p : *paths) std::printf("%s\n", p.c_str());
  if (!panels->has_previous)
    print_error(clip + ": frame 0 has no previous frame; wrote the current frame only");
  return kExitOk;
}

}  // namespace clipwarden::cli
