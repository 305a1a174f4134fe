// clipwarden_bench: how fast analysis runs next to decoding alone, on the same
// clip in the same run, and how much memory it holds.
//
//   clipwarden_bench [CLIP...] [--standard] [--uhd] [--long] [--gate]
//                   [--clips-dir DIR] [--repeat N] [--preset P] [--width N] [--threads N]
//
// For each clip, three measurements, each in a child process so that its
// peak resident memory (ru_maxrss from wait4) is its own:
//   ffmpeg  : `ffmpeg -threads 2 -i CLIP -f null -` (decode only, FFmpeg CLI)
//   decode  : our decoder with scaling to the working width, nothing else
//   analyze : the full analysis (every metric in the registry)
// and the per-stage thread time of the analysis in ms per frame. The ratio
// is analysis fps / FFmpeg decode-only fps from the same run.
//
// Generated clips (testsrc2, H.264, made once with the FFmpeg CLI into
// --clips-dir, default /tmp/clipwarden-bench): --standard 1080p24 10 s (also
// the default when no clip is given), --uhd 2160p24 10 s, --long 1080p24
// 60 s; --gate times `clipwarden gate --jobs 1` against `--jobs 2` on 20
// distinct short clips (360p24 2 s, testsrc2 and mandelbrot at 20 hues and
// start times), in fresh output folders.
#include <sys/resource.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <functional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>
#include <opencv2/core/utility.hpp>

#include "analyzer/cli/args.h"
#include "analyzer/cli/command.h"
#include "analyzer/cli/settings_args.h"
#include "clipwarden/analysis.h"
#include "clipwarden/clip_source.h"

using namespace clipwarden;
using nlohmann::json;
using Clock = std::chrono::steady_clock;
namespace fs = std::filesystem;

namespace clipwarden::cli {
int run_gate(const std::vector<std::string>& args);
}

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
  result["cpu_s"] = usage.ru_utime.tv_sec + usage.ru_utime.tv_usec * 1e-6 + usage.ru_stime.tv_sec +
                    usage.ru_stime.tv_usec * 1e-6;
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

// Makes `path` with the FFmpeg CLI unless it exists; false if that failed.
// `filter`, when given, is an FFmpeg filter chain applied before encoding.
bool make_clip(const std::string& path, const std::string& source, const std::string& size, int seconds,
               const std::string& filter = "") {
  if (fs::exists(path)) return true;
  std::printf("making %s ...\n", path.c_str());
  std::fflush(stdout);
  const std::string cmd = "ffmpeg -v error -nostdin -y -f lavfi -i " + source + "=size=" + size +
                          ":rate=24 -t " + std::to_string(seconds) + (filter.empty() ? "" : " -vf '" + filter + "'") + " -c:v libx264 -pix_fmt yuv420p '" + path +
                          ".tmp.mp4' && mv '" + path + ".tmp.mp4' '" + path + "'";
  return std::system(cmd.c_str()) == 0;
}

// One run's frame rates, kept to summarise repeated runs.
struct ClipRates {
  double ffmpeg_fps = 0, analysis_fps = 0;
};

int bench_clip(const std::string& clip, const cli::AnalysisOptions& options, std::vector<ClipRates>& runs) {
  const json ff = ffmpeg_decode(clip);
  const json dec = our_decode(clip, options.settings);
  const json ana = full_analysis(clip, options.settings, options.policy);
  if (ana.contains("error") || dec.contains("error")) {
    std::printf("%s: %s\n", clip.c_str(), (ana.contains("error") ? ana : dec)["error"].get<std::string>().c_str());
    return 3;
  }
  const double frames = ana["frames"].get<double>();
  const double ff_fps = ff.contains("seconds") ? frames / ff["seconds"].get<double>() : 0;
  const double dec_fps = dec["frames"].get<double>() / dec["seconds"].get<double>();
  const double ana_fps = frames / ana["seconds"].get<double>();
  runs.push_back({ff_fps, ana_fps});
  const std::string source =
      std::to_string(ana["source_width"].get<int>()) + "x" + std::to_string(ana["source_height"].get<int>());
  std::string name = fs::path(clip).filename().string();
  if (name.size() > 24) name = "..." + name.substr(name.size() - 21);
  std::printf("%-24s %-10s %6.0f %9.1f %9.1f %9.1f %6.2f %8.1f %6.0f%%\n", name.c_str(), source.c_str(), frames,
              ff_fps, dec_fps, ana_fps, ff_fps > 0 ? ana_fps / ff_fps : 0.0, ana["peak_rss_mb"].get<double>(),
              100.0 * ana["cpu_s"].get<double>() / ana["seconds"].get<double>());
  std::printf("  thread time per frame (ms):");
  for (const auto& [stage, ms] : ana["stages_ms"].items()) std::printf(" %s %.2f", stage.c_str(), ms.get<double>() / frames);
  std::printf("\n  decode-only peak %.1f MB\n", dec["peak_rss_mb"].get<double>());
  // CPU time per frame does not depend on how well a program spreads over
  // the cores, so it is steadier than fps on a shared machine: with both
  // cores busy, the fps ratio tends to (2 cores / analysis CPU) / (FFmpeg's
  // cores used / FFmpeg CPU).
  const double ff_cpu = ff.contains("cpu_s") ? 1000.0 * ff["cpu_s"].get<double>() / frames : 0;
  const double dec_cpu = 1000.0 * dec["cpu_s"].get<double>() / dec["frames"].get<double>();
  const double ana_cpu = 1000.0 * ana["cpu_s"].get<double>() / frames;
  std::printf("  CPU per frame (ms): ffmpeg decode-only %.2f (at %.0f%% CPU), our decode+scale %.2f, "
              "analysis %.2f\n",
              ff_cpu, ff.contains("seconds") ? 100.0 * ff["cpu_s"].get<double>() / ff["seconds"].get<double>() : 0.0,
              dec_cpu, ana_cpu);
  return 0;
}

double median(std::vector<double> v) {
  std::sort(v.begin(), v.end());
  const size_t n = v.size();
  return n == 0 ? 0 : n % 2 ? v[n / 2] : 0.5 * (v[n / 2 - 1] + v[n / 2]);
}

// Over --repeat runs: the spread of both rates and the ratio of medians
// (a single run on a shared machine can be 15% off).
void print_spread(const std::string& clip, const std::vector<ClipRates>& runs) {
  if (runs.size() < 2) return;
  std::vector<double> ff, ana;
  for (const auto& r : runs) ff.push_back(r.ffmpeg_fps), ana.push_back(r.analysis_fps);
  const auto [ff_lo, ff_hi] = std::minmax_element(ff.begin(), ff.end());
  const auto [ana_lo, ana_hi] = std::minmax_element(ana.begin(), ana.end());
  const double ff_median = median(ff), ana_median = median(ana);
  std::printf("%s over %zu runs: ffmpeg %.0f-%.0f fps (median %.0f), analysis %.1f-%.1f fps (median %.1f), "
              "ratio of medians %.2f\n",
              fs::path(clip).filename().string().c_str(), runs.size(), *ff_lo, *ff_hi, ff_median, *ana_lo, *ana_hi,
              ana_median, ff_median > 0 ? ana_median / ff_median : 0.0);
}

// `clipwarden gate FOLDER --jobs N` in a child, into a fresh output folder
// (so nothing comes from a results store); returns clips per second.
double gate_clips_per_s(const std::string& folder, int jobs, int clips, const std::string& work_dir) {
  const std::string out = work_dir + "/gate-out-jobs" + std::to_string(jobs);
  fs::remove_all(out);
  const json r = in_child([&] {
    const auto start = Clock::now();
    const int status = cli::run_gate({folder, "--out", out, "--jobs", std::to_string(jobs), "--quiet"});
    return json{{"seconds", seconds_since(start)}, {"status", status}};
  });
  fs::remove_all(out);
  if (!r.contains("seconds") || r["status"].get<int>() >= 2) return 0;
  return clips / r["seconds"].get<double>();
}

int bench_gate(const std::string& clips_dir) {
  // Twenty distinct contents: identical clips would be analysed once and
  // then served from the results store, which measures the store instead.
  const std::string folder = clips_dir + "/gate20-distinct";
  fs::create_directories(folder);
  constexpr int kClips = 20;
  for (int i = 0; i < kClips; ++i) {
    char name[64];
    std::snprintf(name, sizeof name, "/short_%02d.mp4", i);
    // Two sources, each turned to its own hue and started at its own time.
    const std::string filter = "trim=start=" + std::to_string(i) + ",setpts=PTS-STARTPTS,hue=h=" + std::to_string(17 * i);
    if (!make_clip(folder + name, i % 2 ? "mandelbrot" : "testsrc2", "640x360", 2, filter)) {
      std::printf("gate: cannot make the short clips with ffmpeg\n");
      return 3;
    }
  }
  const double one = gate_clips_per_s(folder, 1, kClips, clips_dir);
  const double two = gate_clips_per_s(folder, 2, kClips, clips_dir);
  std::printf("gate, %d clips 640x360 24 fps 2 s: --jobs 1 %.2f clips/s, --jobs 2 %.2f clips/s, ratio %.2f\n",
              kClips, one, two, one > 0 ? two / one : 0.0);
  return one > 0 && two > 0 ? 0 : 3;
}

std::vector<cli::OptionSpec> bench_specs() {
  auto specs = cli::analysis_option_specs();
  specs.push_back({"standard", false, "1080p24 10 s testsrc2 clip (the default without clips)"});
  specs.push_back({"uhd", false, "also a 2160p24 10 s clip"});
  specs.push_back({"long", false, "also a 1080p24 60 s clip"});
  specs.push_back({"gate", false, "gate --jobs 1 vs --jobs 2 on 20 short clips"});
  specs.push_back({"clips-dir", true, "where generated clips are kept (default /tmp/clipwarden-bench)"});
  specs.push_back({"repeat", true, "runs per clip, interleaved across clips, then their spread (default 1)"});
  return specs;
}

}  // namespace

int main(int argc, char** argv) {
  cv::setNumThreads(1);  // as the clipwarden CLI does (analyzer/cli/main.cpp)
  std::vector<std::string> args(argv + 1, argv + argc);
  auto parsed = cli::parse_args(args, bench_specs());
  if (!parsed) {
    std::fprintf(stderr, "clipwarden_bench: %s\n", parsed.error().message().c_str());
    return 2;
  }
  auto options = cli::analysis_options_from_args(*parsed);
  if (!options) {
    std::fprintf(stderr, "clipwarden_bench: %s\n", options.error().message().c_str());
    return 2;
  }
  const std::string clips_dir = parsed->get("clips-dir").value_or("/tmp/clipwarden-bench");
  const int repeat = std::atoi(parsed->get("repeat").value_or("1").c_str());
  if (repeat < 1 || repeat > 100) {
    std::fprintf(stderr, "clipwarden_bench: --repeat must be 1-100\n");
    return 2;
  }
  fs::create_directories(clips_dir);
  std::vector<std::string> clips = parsed->positionals;
  const bool standard = parsed->has("standard") ||
                        (clips.empty() && !parsed->has("uhd") && !parsed->has("long") && !parsed->has("gate"));
  struct Generated {
    bool wanted;
    const char* file;
    const char* size;
    int seconds;
  };
  for (const Generated& g : {Generated{standard, "/1080p24_10s.mp4", "1920x1080", 10},
                             Generated{parsed->has("long"), "/1080p24_60s.mp4", "1920x1080", 60},
                             Generated{parsed->has("uhd"), "/2160p24_10s.mp4", "3840x2160", 10}}) {
    if (!g.wanted) continue;
    if (!make_clip(clips_dir + g.file, "testsrc2", g.size, g.seconds)) {
      std::fprintf(stderr, "clipwarden_bench: cannot make %s%s with ffmpeg\n", clips_dir.c_str(), g.file);
      return 3;
    }
    clips.push_back(clips_dir + g.file);
  }
  int status = 0;
  if (!clips.empty()) {
    std::printf("%-24s %-10s %6s %9s %9s %9s %6s %8s %7s\n", "clip", "source", "frames", "ffmpeg", "decode",
                "analyze", "ratio", "peak MB", "CPU");
    std::printf("%-24s %-10s %6s %9s %9s %9s %6s %8s %7s\n", "", "", "", "fps", "fps", "fps", "", "", "");
    std::vector<std::vector<ClipRates>> runs(clips.size());
    for (int round = 0; round < repeat; ++round)
      for (size_t i = 0; i < clips.size(); ++i) status = std::max(status, bench_clip(clips[i], *options, runs[i]));
    for (size_t i = 0; i < clips.size(); ++i) print_spread(clips[i], runs[i]);
    std::printf("ratio = analysis fps / ffmpeg decode-only fps; CPU = analysis CPU time / wall time\n");
  }
  if (parsed->has("gate")) status = std::max(status, bench_gate(clips_dir));
  return status;
}
