// DIR/shard.json: which share of which batch a shard's output folder holds
// and whether its run finished. A scheduler reports a cancelled or killed
// task on its own console only; the record lets merge refuse a batch with a
// shard missing instead of publishing a queue without its clips.
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>

#include "clipwarden/gate.h"
#include "clipwarden/report_io.h"
#include "analyzer/store/hashing.h"

namespace clipwarden {
namespace {

namespace fs = std::filesystem;

constexpr const char* kShardSchema = "clipwarden.shard/1";
constexpr const char* kShardFile = "shard.json";

std::string shard_name(const ShardSpec& s) {
  return "shard " + std::to_string(s.index) + " of " + std::to_string(s.count);
}

// Lines of DIR/queue.jsonl that hold something (the queue is written whole,
// one clip a line; merge parses them later).
int64_t queue_lines(const std::string& dir) {
  std::ifstream in(fs::path(dir) / "queue.jsonl", std::ios::binary);
  int64_t n = 0;
  for (std::string line; std::getline(in, line);)
    if (line.find_first_not_of(" \t\r") != std::string::npos) ++n;
  return n;
}

Expected<ShardRecord> record_from_json(const nlohmann::json& j, const std::string& where) {
  auto bad = [&](const std::string& why) { return input_error(where, why); };
  if (!j.is_object() || j.value("schema", "") != kShardSchema)
    return bad(std::string("not a shard record (schema ") + kShardSchema + ")");
  for (const char* key : {"index", "count", "inputs", "clips"})
    if (!j.contains(key) || !j[key].is_number_integer())
      return bad(std::string(key) + ": not a whole number");
  if (!j.contains("inputs_sha256") || !j["inputs_sha256"].is_string())
    return bad("inputs_sha256: not a string");
  if (!j.contains("finished") || !j["finished"].is_boolean())
    return bad("finished: not true or false");
  ShardRecord r;
  r.shard.index = j["index"].get<int>();
  r.shard.count = j["count"].get<int>();
  r.inputs = j["inputs"].get<int64_t>();
  r.inputs_sha256 = j["inputs_sha256"].get<std::string>();
  r.clips = j["clips"].get<int64_t>();
  r.finished = j["finished"].get<bool>();
  if (r.shard.count < 1 || r.shard.index < 0 || r.shard.index >= r.shard.count)
    return bad("index " + std::to_string(r.shard.index) + " is outside 0.." +
               std::to_string(r.shard.count - 1));
  return r;
}

std::string joined(const std::vector<int>& numbers) {
  std::string out;
  for (int n : numbers) out += (out.empty() ? "" : ", ") + std::to_string(n);
  return out;
}

}  // namespace

ShardRecord shard_record(const std::vector<GateInput>& all_inputs, const ShardSpec& shard) {
  ShardRecord r;
  r.shard = shard;
  r.inputs = static_cast<int64_t>(all_inputs.size());
  std::string ids;
  for (const auto& in : all_inputs) ids += in.id + "\n";
  r.inputs_sha256 = sha256_hex(ids);
  r.clips = static_cast<int64_t>(select_shard(all_inputs, shard).size());
  return r;
}

Status write_shard_record(const std::string& out_dir, const ShardRecord& record) {
  const nlohmann::json j = {{"schema", kShardSchema},
                            {"index", record.shard.index},
                            {"count", record.shard.count},
                            {"inputs", record.inputs},
                            {"inputs_sha256", record.inputs_sha256},
                            {"clips", record.clips},
                            {"finished", record.finished}};
  return write_file_atomic((fs::path(out_dir) / kShardFile).string(), j.dump(2) + "\n");
}

Expected<std::optional<ShardRecord>> read_shard_record(const std::string& dir) {
  const fs::path path = fs::path(dir) / kShardFile;
  std::error_code ec;
  if (!fs::exists(path, ec)) return std::optional<ShardRecord>();
  std::ifstream in(path, std::ios::binary);
  std::stringstream text;
  text << in.rdbuf();
  auto j = nlohmann::json::parse(text.str(), nullptr, /*allow_exceptions=*/false);
  if (!in || j.is_discarded()) return input_error(path.string(), "not valid JSON");
  auto r = record_from_json(j, path.string());
  if (!r) return r.error();
  return std::optional<ShardRecord>(*r);
}

Status check_shard_set(const std::vector<std::string>& dirs) {
  std::vector<std::pair<std::string, std::optional<ShardRecord>>> records;
  std::optional<std::pair<std::string, ShardRecord>> first;  // the first folder with a record
  for (const auto& dir : dirs) {
    auto r = read_shard_record(dir);
    if (!r) return r.error();
    if (*r && !first) first.emplace(dir, **r);
    records.emplace_back(dir, *r);
  }
  if (!first) return Ok{};  // plain gate folders: nothing to check
  const ShardRecord& batch = first->second;
  std::map<int, std::string> holder;  // shard index -> its folder
  std::error_code ec;
  for (const auto& [dir, r] : records) {
    if (!r)
      return usage_error(dir, "has no shard.json but " + first->first + " holds " +
                                  shard_name(batch.shard) +
                                  ": merge the shard folders of one batch only");
    if (r->shard.count != batch.shard.count || r->inputs_sha256 != batch.inputs_sha256)
      return usage_error(dir, "holds " + shard_name(r->shard) + " of another input list than " +
                                  first->first + " (" + shard_name(batch.shard) +
                                  "): every shard must get the same INPUT list");
    auto [it, fresh] = holder.emplace(r->shard.index, dir);
    if (!fresh && fs::equivalent(it->second, dir, ec)) continue;  // one folder twice: merge warns
    if (!fresh)
      return usage_error(dir, "holds " + shard_name(r->shard) + ", as " + it->second +
                                  " does: give each shard once");
    if (!r->finished) {
      return usage_error(dir, shard_name(r->shard) + " did not finish (" +
                                  std::to_string(queue_lines(dir)) + " of its " +
                                  std::to_string(r->clips) +
                                  " clips in its queue: killed, cancelled or pre-empted); "
                                  "rerun that shard (it resumes from its store), then merge again");
    }
    if (queue_lines(dir) != r->clips)
      return input_error(dir, "queue.jsonl has " + std::to_string(queue_lines(dir)) +
                                  " clips but " + shard_name(r->shard) + " has " +
                                  std::to_string(r->clips));
  }
  std::vector<int> missing;
  for (int i = 0; i < batch.shard.count; ++i)
    if (!holder.count(i)) missing.push_back(i);
  if (!missing.empty())
    return usage_error("merge", std::string(missing.size() == 1 ? "shard " : "shards ") +
                                    joined(missing) + " of " + std::to_string(batch.shard.count) +
                                    (missing.size() == 1 ? " is" : " are") +
                                    " missing: no input folder holds it (e.g. an array task "
                                    "cancelled before it started); run it, then merge again");
  return Ok{};
}

}  // namespace clipwarden
