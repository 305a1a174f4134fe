// Fuzz target: the gate's input list, fed a manifest (collect_inputs reads a
// `.jsonl` file, so the input is written to one first), and the --shard
// parser fed the first line. Usage errors are the expected answer to bad
// text; the clips named are never opened here.
#include <unistd.h>

#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <string>

#include "clipwarden/gate.h"

namespace {

std::string manifest_path() {
  static const std::string path = [] {
    const auto dir = std::filesystem::temp_directory_path() /
                     ("clipwarden-fuzz-manifest-" + std::to_string(::getpid()));
    std::filesystem::create_directories(dir);
    return (dir / "manifest.jsonl").string();
  }();
  return path;
}

const char* fixed_environment(const char* name) {
  const std::string key(name);
  if (key == "JOB_COMPLETION_INDEX") return "3";
  if (key == "SLURM_ARRAY_TASK_ID") return "7";
  if (key == "SLURM_ARRAY_TASK_MIN") return "2";
  return nullptr;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const std::string text(reinterpret_cast<const char*>(data), size);
  {
    std::ofstream out(manifest_path(), std::ios::binary | std::ios::trunc);
    out.write(text.data(), static_cast<std::streamsize>(text.size()));
  }
  auto collected = clipwarden::collect_inputs({manifest_path()});
  if (collected) {
    for (const auto& input : collected->inputs)
      if (input.path.empty() || input.id.empty()) std::abort();  // parse_manifest_line refuses both
    for (int count : {1, 3, 16})
      (void)clipwarden::select_shard(collected->inputs, clipwarden::ShardSpec{0, count});
  }
  const std::string first_line = text.substr(0, text.find('\n'));
  auto shard = clipwarden::parse_shard(first_line, fixed_environment);
  if (shard && !(shard->index >= 0 && shard->index < shard->count)) std::abort();
  return 0;
}
