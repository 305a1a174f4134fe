// clipwarden: checks generated video clips for temporal incoherence.
//
// This launcher answers --help and --version itself and loads the commands
// (clipwarden-commands.so, and with it FFmpeg's and OpenCV's ~150 shared
// libraries) only when a command runs. Debian's FFmpeg alone pulls in 136
// libraries; loading them costs ~0.1 s of start-up and ~30 MB of resident
// memory, which `--version`, `--help` and scripts probing for the tool need
// not pay.
#include <dlfcn.h>

#include <cstdio>
#include <filesystem>
#include <string>
#include <system_error>
#include <vector>

#include "analyzer/cli/command.h"
#include "analyzer/cli/command_names.h"
#include "analyzer/cli/module_entry.h"
#include "clipwarden/version.h"

using namespace clipwarden::cli;
namespace fs = std::filesystem;

namespace {

void print_usage() {
  std::printf("usage: clipwarden COMMAND [ARGS...]\n\ncommands:\n");
  for (const auto& c : kCommandNames) std::printf("  %-9s %s\n", c.name, c.summary);
  std::printf(
      "\n`clipwarden COMMAND --help` describes a command; `clipwarden --version` prints the "
      "version.\n");
}

bool is_command(const std::string& name) {
  for (const auto& c : kCommandNames)
    if (name == c.name) return true;
  return false;
}

// The module sits beside the executable in a build tree, and in the
// library folder's clipwarden/ when installed (cmake/Install.cmake).
std::vector<fs::path> module_candidates() {
  std::error_code ec;
  const fs::path exe = fs::read_symlink("/proc/self/exe", ec);
  const fs::path dir = ec ? fs::path(".") : exe.parent_path();
  return {dir / CLIPWARDEN_COMMANDS_MODULE,
          (dir / CLIPWARDEN_MODULE_DIR_FROM_BIN / CLIPWARDEN_COMMANDS_MODULE).lexically_normal()};
}

int run_in_module(int argc, char** argv) {
  std::string failure;
  for (const fs::path& path : module_candidates()) {
    std::error_code ec;
    if (!fs::exists(path, ec)) continue;
    void* module = dlopen(path.c_str(), RTLD_LAZY | RTLD_LOCAL);
    if (!module) {
      const char* why = dlerror();
      failure = "cannot load " + path.string() + ": " + (why ? why : "unknown reason");
      break;
    }
    auto* run = reinterpret_cast<int (*)(int, char**)>(dlsym(module, kModuleEntryName));
    if (!run) {
      failure = path.string() + " has no " + kModuleEntryName;
      break;
    }
    return run(argc, argv);  // never unloaded: its threads and atexit handlers may outlive the call
  }
  if (failure.empty())
    failure = std::string("cannot find ") + CLIPWARDEN_COMMANDS_MODULE +
              " beside the executable or in " + module_candidates().back().parent_path().string();
  print_error(failure + " (the installation is incomplete)");
  return kExitUsage;
}

}  // namespace

int main(int argc, char** argv) {
  std::vector<std::string> args(argv + 1, argv + argc);
  if (args.empty() || args[0] == "--help" || args[0] == "-h" || args[0] == "help") {
    print_usage();
    return args.empty() ? kExitUsage : kExitOk;
  }
  if (args[0] == "--version") {
    std::printf("clipwarden %s\n", clipwarden::version());
    return kExitOk;
  }
  if (!is_command(args[0])) {
    print_error("unknown command '" + args[0] + "' (see clipwarden --help)");
    return kExitUsage;
  }
  return run_in_module(argc - 1, argv + 1);
}
