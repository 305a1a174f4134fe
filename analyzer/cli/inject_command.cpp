// clipwarden inject CLIP --defect SPEC... -o OUT [--truth FILE] [--seed N]:
// a copy of a clean clip with known defects, and the truth of where they are.
#include <cstdio>

#include "analyzer/cli/args.h"
#include "analyzer/cli/command.h"
#include "analyzer/cli/progress.h"
#include "clipwarden/inject.h"

namespace clipwarden::cli {
namespace {

Expected<VideoCodec> codec_from_args(const ParsedArgs& parsed) {
  const std::string name = parsed.get("codec").value_or("auto");
  if (name == "auto") return VideoCodec::automatic;
  if (name == "h264") return VideoCodec::h264;
  if (name == "ffv1") return VideoCodec::ffv1;
  return usage_error("--codec", "expects auto, h264 or ffv1, got '" + name + "'");
}

int exit_status_for(const Error& e) {
  return e.kind == ErrorKind::usage   ? kExitUsage
         : e.kind == ErrorKind::input ? kExitInputError
                                      : kExitUsage;
}

}  // namespace

int run_inject(const std::vector<std::string>& args) {
  const std::vector<OptionSpec> specs = {
      {"defect", true, "a defect, CLASS@RANGE[:KEY=VALUE,...] (repeat for more; docs/inject.md)",
       "", true},
      {"output", true, "the output clip (.mp4 for H.264, .mkv for FFV1)", "o"},
      {"truth", true, "the truth JSON (default: OUT's name with .truth.json)"},
      {"seed", true, "seed of every random choice (default 1)"},
      {"codec", true, "auto (H.264 if available, else FFV1), h264 or ffv1 (lossless)"},
      {"crf", true, "H.264 quality, 0 (best) to 51 (default 18)"},
      {"quiet", false, "no progress on stderr"},
  };
  int stop_status = kExitOk;
  auto parsed = parse_command_line(
      args, specs,
      {"inject", "CLIP --defect SPEC... -o OUT [options]",
       "Writes a copy of a clean clip with known defects injected, and a JSON truth\n"
       "file of where they are. Classes: flicker, local_flicker, boiling,\n"
       "colour_drift, shape_drift, vanish, freeze, drop, cut, jerk, strobe.\n"
       "Example: clipwarden inject shot.mp4 --defect flicker@30-59:strength=0.1 -o bad.mp4"},
      stop_status);
  if (!parsed) return stop_status;
  if (parsed->positionals.size() != 1) {
    print_error("inject takes exactly one CLIP (see clipwarden inject --help)");
    return kExitUsage;
  }
  InjectOptions options;
  options.defect_specs = parsed->get_all("defect");
  options.output_path = parsed->get("output").value_or("");
  options.truth_path = parsed->get("truth").value_or("");
  auto seed = parsed->get_int("seed", 0, 2147483647);
  auto crf = parsed->get_int("crf", 0, 51);
  auto codec = codec_from_args(*parsed);
  for (const Error* e : {seed ? nullptr : &seed.error(), crf ? nullptr : &crf.error(),
                         codec ? nullptr : &codec.error()})
    if (e) {
      print_error(e->message());
      return kExitUsage;
    }
  options.seed = static_cast<uint64_t>(seed->value_or(1));
  options.writer.crf = crf->value_or(18);
  options.writer.codec = *codec;

  const std::string& clip = parsed->positionals[0];
  ProgressLine progress(clip, parsed->has("quiet") || !stderr_is_terminal());
  options.on_progress = [&](int64_t done, int64_t expected) { progress.update(done, expected); };
  auto truth = inject_defects(clip, options);
  progress.finish();
  if (!truth) {
    print_error(truth.error().message());
    return exit_status_for(truth.error());
  }
  if (!parsed->has("quiet"))
    std::printf("%s: %zu defect(s) -> %s (truth: %s)\n", clip.c_str(), (*truth)["defects"].size(),
                (*truth)["output"]["path"].get<std::string>().c_str(),
                (*truth)["truth_path"].get<std::string>().c_str());
  return kExitOk;
}

}  // namespace clipwarden::cli
