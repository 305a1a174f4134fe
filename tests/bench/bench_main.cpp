// framelint_bench: how fast analysis runs next to decoding alone, on the same
// clip in the same run, and how much memory it holds.
//
//   framelint_bench CLIP... [--preset P] [--width N] [--threads N]
//
// For each clip, three measurements, each in a child process so that its
// peak resident memory (ru_maxrss from wait4) is its own:
//   ffmpeg  : `ffmpeg -threads 2 -i CLIP -f null -` (decode only, FFmpeg CLI)
//   decode  : our decoder with scaling to the working width, nothing else
//   analyze : the full analysis (every metric in the registry)
// and the per-stage thread time of the analysis in ms per frame.
#include <sys/resource.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "analyzer/cli/args.h"
#include "analyzer/cli/settings_args.h"
#include "framelint/analysis.h"
#include "framelint/clip_source.h"

using namespace framelint;
using nlohmann::json;
using Clock = std::chrono::steady_clock;

namespace {

double seconds_since(Clock::time_point t) { return std::chrono::duration<double>(Clock::now() - t).count(); }

// Runs `work` in a child; returns its JSON result plus its peak RSS in MB.
json in_child(const std::function<json()>& work) {
  int fds[2];
  if (pipe(fds) != 0) return {{"error", "pipe failed"}};
  std::fflush(stdout);
  const pid_t pid = fork();
  if (pid == 0) {
    close(fds[0]);
    const std::string out = work().dump();
    if (write(fds[1], out.data(), out.size()) < 0) _exit(2);
    _exit(0);
  }
  close(fds[1]);
  std::string text;
  char buf[4096];
  for (ssize_t n; (n = read(fds[0], buf, sizeof buf)) > 0;) text.append(buf, static_cast<size_t>(n));
  close(fds[0]);
  int status = 0;
  struct rusage usage {};
  wait4(pid, &status, 0, &usage);
  json result = json::parse(text, nullptr, false);
  if (result.is_discarded()) result = {{"error", "child failed"}};
  result["peak_rss_mb"] = usage.ru_maxrss / 1024.0;  // Linux reports KiB
  return result;
}

json ffmpeg_decode(const std::string& clip) {
  return in_child([&] {
    const auto start = Clock::now();
    const std::string cmd = "ffmpeg -v error -nostdin -threads 2 -i '" + clip + "' -f null - 2>/dev/null";
    if (std::system(cmd.c_str()) != 0) return json{{"error", "ffmpeg failed or is not installed"}};
    return json{{"seconds", seconds_since(start)}};
  });
}

json our_decode(const std::string& clip, const AnalysisSettings& settings) {
  return in_child([&] {
    SourceOptions options;
    options.working_long_side = settings.working_long_side;
    options.folder_fps = settings.folder_fps;
    options.threads = 2;
    auto source = ClipSource::open(clip, options);
    if (!source) return json{{"error", source.error().message()}};
    const auto start = Clock::now();
    DecodedFrame frame;
    int64_t frames = 0;
    while (true) {
      auto more = (*source)->read(frame);
      if (!more || !*more) break;
      ++frames;
    }
    return json{{"seconds", seconds_since(start)}, {"frames", frames},
                {"width", frame.bgr.cols}, {"height", frame.bgr.rows}};
  });
}

json full_analysis(const std::string& clip, const AnalysisSettings& settings, const Policy& policy) {
  return in_child([&] {
    PipelineTimings timings;
    AnalysisHooks hooks;
    hooks.timings = &timings;
    const auto start = Clock::now();
    auto report = analyze_clip(clip, settings, policy, hooks);
    if (!report) return json{{"error", report.error().message()}};
    json stages = {{"decode", timings.decode_ms}, {"pair", timings.pair_ms}, {"finish", timings.finish_ms}};
    for (const auto& [name, ms] : timings.metric_ms) stages[name] = ms;
    return json{{"seconds", seconds_since(start)}, {"frames", report->clip.frame_count},
                {"source_width", report->clip.width}, {"source_height", report->clip.height},
                {"stages_ms", stages}};
  });
}

}  // namespace

int main(int argc, char** argv) {
  std::vector<std::string> args(argv + 1, argv + argc);
  auto parsed = cli::parse_args(args, cli::analysis_option_specs());
  if (!parsed || parsed->positionals.empty()) {
    std::fprintf(stderr, "usage: framelint_bench CLIP... [--preset P] [--width N] [--threads N]\n");
    return 2;
  }
  auto options = cli::analysis_options_from_args(*parsed);
  if (!options) {
    std::fprintf(stderr, "framelint_bench: %s\n", options.error().message().c_str());
    return 2;
  }
  std::printf("%-28s %-10s %6s %9s %9s %9s %6s %8s\n", "clip", "source", "frames", "ffmpeg", "decode",
              "analyze", "ratio", "peak MB");
  std::printf("%-28s %-10s %6s %9s %9s %9s %6s %8s\n", "", "", "", "fps", "fps", "fps", "", "");
  int status = 0;
  for (const auto& clip : parsed->positionals) {
    const json ff = ffmpeg_decode(clip);
    const json dec = our_decode(clip, options->settings);
    const json ana = full_analysis(clip, options->settings, options->policy);
    if (ana.contains("error") || dec.contains("error")) {
      std::printf("%s: %s\n", clip.c_str(), (ana.contains("error") ? ana : dec)["error"].get<std::string>().c_str());
      status = 3;
      continue;
    }
    const double frames = ana["frames"].get<double>();
    const double ff_fps = ff.contains("seconds") ? frames / ff["seconds"].get<double>() : 0;
    const double dec_fps = dec["frames"].get<double>() / dec["seconds"].get<double>();
    const double ana_fps = frames / ana["seconds"].get<double>();
    const std::string source = std::to_string(ana["source_width"].get<int>()) + "x" +
                               std::to_string(ana["source_height"].get<int>());
    std::string name = clip.size() > 28 ? "..." + clip.substr(clip.size() - 25) : clip;
    std::printf("%-28s %-10s %6.0f %9.1f %9.1f %9.1f %6.2f %8.1f\n", name.c_str(), source.c_str(), frames, ff_fps,
                dec_fps, ana_fps, ff_fps > 0 ? ana_fps / ff_fps : 0.0, ana["peak_rss_mb"].get<double>());
    std::printf("  thread time per frame (ms):");
    for (const auto& [stage, ms] : ana["stages_ms"].items()) std::printf(" %s %.2f", stage.c_str(), ms.get<double>() / frames);
    std::printf("\n  decode-only peak %.1f MB; ratio = analysis fps / ffmpeg decode-only fps\n",
                dec["peak_rss_mb"].get<double>());
  }
  return status;
}
