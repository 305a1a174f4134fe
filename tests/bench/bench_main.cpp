// clipwarden_bench: how fast analysis runs next to decoding alone, on the same
// clip in the same run, and how much memory it holds.
//
//   clipwarden_bench [CLIP...] [--standard] [--real] [--uhd] [--long] [--gate]
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
// Clips made once with the FFmpeg CLI into --clips-dir (default
// /tmp/clipwarden-bench): --standard 1080p24 10 s testsrc2 and 1080p10 24 s
// of real footage (opencv-doc's vtest.avi scaled up; the default when no
// clip is given), --real the real footage alone, --uhd 2160p24 10 s, --long 1080p24 60 s; --gate
// times `clipwarden gate --jobs 1` against `--jobs 2` on a batch like a
// generation queue's (20 clips of opencv-doc footage: 480p-720p, 2-6 s,
// 8-24 fps, H.264 MP4 and GIF), in fresh output folders.
//
// Every run starts with the CLI's start-up: wall and CPU time of
// `clipwarden --version` and of a command that loads the analysis
// (`clipwarden probe --help`), and the shared libraries each loads.
#include <fcntl.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <functional>
#include <set>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>
#include <opencv2/core/utility.hpp>

#include "analyzer/cli/args.h"
#include "analyzer/cli/command.h"
#include "analyzer/cli/settings_args.h"
#include "analyzer/core/allocator_policy.h"
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
      if (!more || *more == FrameRead::end_of_clip) break;
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
// `input` is FFmpeg's input arguments, `output` its encoding arguments.
bool make_clip_with(const std::string& path, const std::string& input, const std::string& output) {
  if (fs::exists(path)) return true;
  std::printf("making %s ...\n", path.c_str());
  std::fflush(stdout);
  const std::string tmp = path + ".tmp" + fs::path(path).extension().string();
  const std::string cmd = "ffmpeg -v error -nostdin -y " + input + " " + output + " '" + tmp + "' && mv '" +
                          tmp + "' '" + path + "'";
  return std::system(cmd.c_str()) == 0;
}

// A test-pattern clip: `source` is an FFmpeg lavfi source.
bool make_clip(const std::string& path, const std::string& source, const std::string& size, int seconds) {
  return make_clip_with(path,
                        "-f lavfi -i " + source + "=size=" + size + ":rate=24 -t " + std::to_string(seconds),
                        "-c:v libx264 -pix_fmt yuv420p");
}

const std::string kOpencvData = "/usr/share/doc/opencv-doc/examples/data/";

// Real footage at 1080p: the first 240 frames of opencv-doc's vtest.avi
// (768x576, 10 fps, a fixed camera over a walkway) scaled to 1920 wide and
// cropped to 1080 rows.
bool make_real_1080p(const std::string& path) {
  return make_clip_with(path, "-i '" + kOpencvData + "vtest.avi'",
                        "-vf 'scale=1920:1440:flags=lanczos,crop=1920:1080' -frames:v 240 -c:v libx264 "
                        "-pix_fmt yuv420p");
}

// Start-up: a program run to its end, `runs` times (median wall and CPU
// time), and the shared libraries it loads, from the dynamic loader's own
// log (LD_DEBUG=files: one "file=NAME ... needed by / dynamically loaded by"
// line per object it maps, dlopen'ed modules included).
struct Startup {
  double wall_ms = 0, cpu_ms = 0;
  size_t libraries = 0;
};

double median(std::vector<double> v);

// Runs `argv` with stdout to /dev/null and stderr to `stderr_fd` (or
// /dev/null); returns its CPU seconds, or a negative number on failure.
double run_program(const std::vector<std::string>& argv, bool loader_log, int stderr_fd) {
  std::fflush(stdout);
  const pid_t pid = fork();
  if (pid == 0) {
    const int null_fd = open("/dev/null", O_WRONLY);
    dup2(null_fd, 1);
    dup2(stderr_fd >= 0 ? stderr_fd : null_fd, 2);
    if (loader_log) setenv("LD_DEBUG", "files", 1);
    std::vector<char*> args;
    for (const auto& a : argv) args.push_back(const_cast<char*>(a.c_str()));
    args.push_back(nullptr);
    execv(args[0], args.data());
    _exit(127);
  }
  int status = 0;
  struct rusage usage {};
  if (pid < 0 || wait4(pid, &status, 0, &usage) < 0 || !WIFEXITED(status) || WEXITSTATUS(status) == 127) return -1;
  return usage.ru_utime.tv_sec + usage.ru_utime.tv_usec * 1e-6 + usage.ru_stime.tv_sec + usage.ru_stime.tv_usec * 1e-6;
}

size_t libraries_loaded(const std::vector<std::string>& argv) {
  char log_path[] = "/tmp/clipwarden-bench-ld-XXXXXX";
  const int fd = mkstemp(log_path);
  if (fd < 0) return 0;
  run_program(argv, true, fd);
  close(fd);
  std::ifstream log(log_path);
  std::set<std::string> names;
  for (std::string line; std::getline(log, line);) {
    const size_t at = line.find("file=");
    if (at == std::string::npos) continue;
    if (line.find("needed by") == std::string::npos && line.find("dynamically loaded by") == std::string::npos)
      continue;
    names.insert(line.substr(at + 5, line.find(' ', at) - at - 5));
  }
  fs::remove(log_path);
  return names.size();
}

Startup time_startup(const std::vector<std::string>& argv, int runs) {
  Startup s;
  std::vector<double> wall, cpu;
  for (int i = 0; i < runs; ++i) {
    const auto start = Clock::now();
    const double cpu_s = run_program(argv, false, -1);
    if (cpu_s < 0) return s;
    wall.push_back(1000 * seconds_since(start));
    cpu.push_back(1000 * cpu_s);
  }
  s.wall_ms = median(wall);
  s.cpu_ms = median(cpu);
  s.libraries = libraries_loaded(argv);
  return s;
}

void bench_startup() {
  const std::string cli = CLIPWARDEN_BINARY;
  const Startup version = time_startup({cli, "--version"}, 20);
  const Startup command = time_startup({cli, "probe", "--help"}, 10);
  std::printf("start-up, median of 20 / 10 runs: `clipwarden --version` %.1f ms (CPU %.1f ms, %zu shared "
              "libraries); a command (`probe --help`) %.1f ms (CPU %.1f ms, %zu shared libraries)\n",
              version.wall_ms, version.cpu_ms, version.libraries, command.wall_ms, command.cpu_ms,
              command.libraries);
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
// (so nothing comes from a results store): clips per minute and peak RSS.
struct GateRate {
  double clips_per_min = 0, peak_rss_mb = 0;
};

GateRate gate_rate(const std::string& folder, int jobs, int clips, const std::string& work_dir) {
  const std::string out = work_dir + "/gate-out-jobs" + std::to_string(jobs);
  fs::remove_all(out);
  const json r = in_child([&] {
    const auto start = Clock::now();
    const int status = cli::run_gate({folder, "--out", out, "--jobs", std::to_string(jobs), "--quiet"});
    return json{{"seconds", seconds_since(start)}, {"status", status}};
  });
  fs::remove_all(out);
  if (!r.contains("seconds") || r["status"].get<int>() >= 2) return {};
  return {60.0 * clips / r["seconds"].get<double>(), r["peak_rss_mb"].get<double>()};
}

// A batch like a generation queue's: 20 distinct short clips cut from
// opencv-doc footage (Megamind.avi, an animated film, and vtest.avi, a fixed
// camera over a walkway) at 480p-720p, 2-6 s and 8-24 fps (vtest at most its
// own 10 fps, so no frame is repeated), every third one a GIF.
bool make_gate_batch(const std::string& folder, int clips) {
  const char* sizes[] = {"854:480", "960:540", "1280:720", "640:480"};
  for (int i = 0; i < clips; ++i) {
    const bool animated = i % 2 == 0;
    const int seconds = 2 + i % 5;
    const int fps = animated ? (i % 3 == 0 ? 12 : i % 3 == 1 ? 16 : 24) : (i % 4 < 2 ? 8 : 10);
    // Megamind runs 11.3 s, vtest 79.5 s: start times spread over each.
    const double start_s = animated ? (i / 2) * 0.5 : (i / 2) * 7.0;
    const bool gif = i % 3 == 2;
    char name[64];
    std::snprintf(name, sizeof name, "/clip_%02d.%s", i, gif ? "gif" : "mp4");
    const std::string input = "-ss " + std::to_string(start_s) + " -t " + std::to_string(seconds) + " -i '" +
                              kOpencvData + (animated ? "Megamind.avi" : "vtest.avi") + "'";
    const std::string filter =
        "fps=" + std::to_string(fps) + ",scale=" + sizes[i % 4] + ":flags=lanczos,setsar=1";
    if (!make_clip_with(folder + name, input,
                        "-vf '" + filter + "' " + (gif ? "-f gif" : "-c:v libx264 -pix_fmt yuv420p")))
      return false;
  }
  return true;
}

int bench_gate(const std::string& clips_dir) {
  // Twenty distinct contents: identical clips would be analysed once and
  // then served from the results store, which measures the store instead.
  const std::string folder = clips_dir + "/gate20-footage";
  fs::create_directories(folder);
  constexpr int kClips = 20;
  if (!make_gate_batch(folder, kClips)) {
    std::printf("gate: cannot make the batch with ffmpeg from %s\n", kOpencvData.c_str());
    return 3;
  }
  const GateRate one = gate_rate(folder, 1, kClips, clips_dir);
  const GateRate two = gate_rate(folder, 2, kClips, clips_dir);
  std::printf("gate, %d clips (480p-720p, 2-6 s, 8-24 fps, MP4 and GIF): --jobs 1 %.1f clips/min (peak %.0f MB), "
              "--jobs 2 %.1f clips/min (peak %.0f MB), ratio %.2f\n",
              kClips, one.clips_per_min, one.peak_rss_mb, two.clips_per_min, two.peak_rss_mb,
              one.clips_per_min > 0 ? two.clips_per_min / one.clips_per_min : 0.0);
  return one.clips_per_min > 0 && two.clips_per_min > 0 ? 0 : 3;
}

std::vector<cli::OptionSpec> bench_specs() {
  auto specs = cli::analysis_option_specs();
  specs.push_back({"standard", false, "1080p24 10 s testsrc2 and real 1080p footage (the default without clips)"});
  specs.push_back({"real", false, "real footage at 1080p (opencv-doc vtest.avi scaled up, 240 frames)"});
  specs.push_back({"uhd", false, "also a 2160p24 10 s clip"});
  specs.push_back({"long", false, "also a 1080p24 60 s clip"});
  specs.push_back({"gate", false, "gate --jobs 1 vs --jobs 2 on 20 short clips of real footage"});
  specs.push_back({"clips-dir", true, "where generated clips are kept (default /tmp/clipwarden-bench)"});
  specs.push_back({"repeat", true, "runs per clip, interleaved across clips, then their spread (default 1)"});
  return specs;
}

}  // namespace

int main(int argc, char** argv) {
  // As the clipwarden CLI does (analyzer/cli/module_entry.cpp).
  cv::setNumThreads(1);
  keep_freed_buffers_for_reuse();
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
  const bool standard = parsed->has("standard") || (clips.empty() && !parsed->has("real") && !parsed->has("uhd") &&
                                                    !parsed->has("long") && !parsed->has("gate"));
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
  // The 1080p case is judged on real footage too, not only on a test
  // pattern: the standard run includes it.
  if (parsed->has("real") || standard) {
    const std::string real = clips_dir + "/vtest_1080p10_240f.mp4";
    if (!make_real_1080p(real)) {
      std::fprintf(stderr, "clipwarden_bench: cannot make %s with ffmpeg from %s\n", real.c_str(),
                   kOpencvData.c_str());
      return 3;
    }
    clips.push_back(real);
  }
  bench_startup();
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
