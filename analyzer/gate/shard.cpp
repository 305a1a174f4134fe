// Deterministic shares of a batch for cluster schedulers: every job computes
// the same input list and keeps the clips whose id hashes to its index.
#include <charconv>

#include "clipwarden/gate.h"

namespace clipwarden {
namespace {

Expected<int> parse_int(const std::string& text, const std::string& subject) {
  int v = 0;
  auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), v);
  if (text.empty() || ec != std::errc() || end != text.data() + text.size())
    return usage_error(subject, "expects a whole number, got '" + text + "'");
  return v;
}

// The shard index a scheduler gives this job, 0-based.
Expected<int> index_from_environment(const std::function<const char*(const char*)>& getenv) {
  if (const char* k8s = getenv("JOB_COMPLETION_INDEX"))
    return parse_int(k8s, "JOB_COMPLETION_INDEX");
  // The task id itself, not its offset from SLURM_ARRAY_TASK_MIN: rerunning
  // one failed task alone (sbatch --array=2) starts a new array whose
  // minimum is that task, and the offset would then name shard 0. Arrays
  // must therefore count from 0 (--array=0-N-1); others get a clear error.
  if (const char* slurm = getenv("SLURM_ARRAY_TASK_ID"))
    return parse_int(slurm, "SLURM_ARRAY_TASK_ID");
  return usage_error("--shard auto/N",
                     "needs JOB_COMPLETION_INDEX or SLURM_ARRAY_TASK_ID in the environment");
}

}  // namespace

Expected<ShardSpec> parse_shard(const std::string& text,
                                const std::function<const char*(const char*)>& getenv) {
  const auto slash = text.find('/');
  if (slash == std::string::npos)
    return usage_error("--shard", "expects I/N (0-based I) or auto/N, got '" + text + "'");
  ShardSpec spec;
  auto count = parse_int(text.substr(slash + 1), "--shard");
  if (!count) return count.error();
  if (*count < 1 || *count > 1000000)
    return usage_error("--shard", "N must be from 1 to 1000000, got " + text);
  spec.count = *count;
  const std::string index_text = text.substr(0, slash);
  auto index =
      index_text == "auto" ? index_from_environment(getenv) : parse_int(index_text, "--shard");
  if (!index) return index.error();
  if (*index < 0 || *index >= spec.count) {
    const std::string last = std::to_string(spec.count - 1);
    return usage_error(
        "--shard",
        "index " + std::to_string(*index) + " is outside 0.." + last +
            " (shards are numbered from 0" +
            (index_text == "auto" ? "; a Slurm array: --array=0-" + last : std::string()) + ")");
  }
  spec.index = *index;
  return spec;
}

uint64_t fnv1a_64(std::string_view bytes) {
  // FNV-1a, 64-bit (Fowler, Noll, Vo; offset basis and prime as published).
  uint64_t h = 0xcbf29ce484222325ull;
  for (unsigned char c : bytes) {
    h ^= c;
    h *= 0x100000001b3ull;
  }
  return h;
}

uint64_t shard_hash(const std::string& id) {
  uint64_t h = fnv1a_64(id);
  // splitmix64 finalizer (Steele, Lea, Flood 2014): FNV's low bits mix
  // poorly on short keys that differ only in their last characters.
  h ^= h >> 30;
  h *= 0xbf58476d1ce4e5b9ull;
  h ^= h >> 27;
  h *= 0x94d049bb133111ebull;
  h ^= h >> 31;
  return h;
}

int shard_of(const std::string& id, int count) {
  return count <= 1 ? 0 : static_cast<int>(shard_hash(id) % static_cast<uint64_t>(count));
}

std::vector<GateInput> select_shard(const std::vector<GateInput>& inputs, const ShardSpec& shard) {
  std::vector<GateInput> out;
  for (const auto& in : inputs)
    if (shard_of(in.id, shard.count) == shard.index) out.push_back(in);
  return out;
}

}  // namespace clipwarden
