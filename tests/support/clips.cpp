#include "support/clips.h"

#include <fcntl.h>
#include <spawn.h>
#include <sys/wait.h>
#include <unistd.h>

#include <atomic>
#include <cmath>
#include <cstdlib>
#include <fstream>
#include <random>
#include <sstream>

extern char** environ;

namespace clipwarden::test {
namespace {

std::string slurp(const std::filesystem::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

std::filesystem::path fresh_temp_path() {
  static std::atomic<int> counter{0};
  std::random_device seed;
  const auto base = std::filesystem::temp_directory_path();
  for (;;) {
    auto candidate = base / ("clipwarden-test-" + std::to_string(::getpid()) + "-" +
                             std::to_string(counter++) + "-" + std::to_string(seed() % 100000));
    std::error_code ec;
    if (std::filesystem::create_directory(candidate, ec)) return candidate;
  }
}

}  // namespace

TempDir::TempDir() : path_(fresh_temp_path()) {}

TempDir::~TempDir() {
  const char* keep = std::getenv("CLIPWARDEN_KEEP_TEMP");
  if (keep && std::string(keep) == "1") return;
  std::error_code ec;
  std::filesystem::remove_all(path_, ec);
}

CommandResult run_command(const std::vector<std::string>& argv) {
  CommandResult result;
  if (argv.empty()) return result;
  // Output goes to files, not pipes: no deadlock however much a tool prints.
  TempDir capture;
  const std::string out_path = capture.file("stdout"), err_path = capture.file("stderr");
  posix_spawn_file_actions_t actions;
  posix_spawn_file_actions_init(&actions);
  posix_spawn_file_actions_addopen(&actions, 0, "/dev/null", O_RDONLY, 0);
  posix_spawn_file_actions_addopen(&actions, 1, out_path.c_str(), O_WRONLY | O_CREAT | O_TRUNC,
                                   0644);
  posix_spawn_file_actions_addopen(&actions, 2, err_path.c_str(), O_WRONLY | O_CREAT | O_TRUNC,
                                   0644);
  std::vector<char*> args;
  for (const auto& a : argv) args.push_back(const_cast<char*>(a.c_str()));
  args.push_back(nullptr);
  pid_t pid = 0;
  const int rc = posix_spawnp(&pid, args[0], &actions, nullptr, args.data(), environ);
  posix_spawn_file_actions_destroy(&actions);
  if (rc != 0) {
    result.err = "cannot start " + argv[0];
    return result;
  }
  int status = 0;
  while (waitpid(pid, &status, 0) < 0 && errno == EINTR) {
  }
  result.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  result.out = slurp(out_path);
  result.err = slurp(err_path);
  return result;
}

bool have_tool(const std::string& name) {
  const char* path = std::getenv("PATH");
  std::stringstream dirs(path ? path : "/usr/bin:/bin");
  std::string dir;
  while (std::getline(dirs, dir, ':'))
    if (!dir.empty() && ::access((std::filesystem::path(dir) / name).c_str(), X_OK) == 0)
      return true;
  return false;
}

std::string make_lavfi_clip(const std::string& out, const std::string& source,
                            const std::vector<std::string>& extra,
                            const std::vector<std::string>& inputs_before) {
  std::vector<std::string> argv = {"ffmpeg", "-nostdin", "-v", "error", "-y"};
  argv.insert(argv.end(), inputs_before.begin(), inputs_before.end());
  argv.insert(argv.end(), {"-f", "lavfi", "-i", source});
  argv.insert(argv.end(), extra.begin(), extra.end());
  argv.push_back(out);
  const CommandResult r = run_command(argv);
  if (r.exit_code == 0) return "";
  return r.err.empty() ? "ffmpeg failed" : r.err;
}

std::vector<double> ffprobe_frame_times(const std::string& clip, const std::string& entry) {
  const CommandResult r = run_command({"ffprobe", "-v", "error", "-select_streams", "v:0",
                                       "-show_entries", "frame=" + entry, "-of", "csv=p=0", clip});
  std::vector<double> times;
  if (r.exit_code != 0) return times;
  std::stringstream lines(r.out);
  std::string line;
  while (std::getline(lines, line)) {
    while (!line.empty() && (line.back() == ',' || line.back() == '\r')) line.pop_back();
    if (line.empty()) continue;
    times.push_back(line == "N/A" ? std::nan("") : std::stod(line));
  }
  return times;
}

std::string ffprobe_value(const std::string& clip, const std::string& entry,
                          const std::vector<std::string>& extra) {
  std::vector<std::string> argv = {"ffprobe", "-v", "error", "-select_streams", "v:0"};
  argv.insert(argv.end(), extra.begin(), extra.end());
  argv.insert(argv.end(), {"-show_entries", entry, "-of", "default=nw=1:nk=1", clip});
  const CommandResult r = run_command(argv);
  if (r.exit_code != 0) return "";
  std::string value = r.out.substr(0, r.out.find('\n'));
  return value;
}

std::vector<double> ffmpeg_frame_metadata(const std::string& clip, const std::string& filter,
                                          const std::string& key) {
  TempDir dir;
  const std::string listing = dir.file("metadata.txt");
  const CommandResult r =
      run_command({"ffmpeg", "-nostdin", "-v", "error", "-i", clip, "-map", "0:v:0", "-vf",
                   filter + ",metadata=mode=print:file=" + listing, "-f", "null", "-"});
  std::vector<double> values;
  if (r.exit_code != 0) return values;
  std::ifstream in(listing);
  std::string line;
  const std::string prefix = key + "=";
  while (std::getline(in, line))
    if (line.rfind(prefix, 0) == 0) values.push_back(std::stod(line.substr(prefix.size())));
  return values;
}

std::optional<std::string> opencv_data(const std::string& name) {
  const std::filesystem::path p =
      std::filesystem::path("/usr/share/doc/opencv-doc/examples/data") / name;
  if (std::filesystem::exists(p)) return p.string();
  return std::nullopt;
}

}  // namespace clipwarden::test
