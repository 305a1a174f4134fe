// The review-queue gate: many clips in, one verdict per clip out, in a
// queue a person or a pipeline acts on. Inputs are clips, folders and
// manifests; results are per-clip reports, DIR/queue.jsonl, DIR/index.html
// and rows in the results store (analyzer/store/result_store.h). A batch never
// stops at a bad clip: its error is recorded in its queue line.
#pragma once

#include <atomic>
#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include <nlohmann/json.hpp>

#include "clipwarden/analysis.h"
#include "clipwarden/error.h"
#include "clipwarden/policy.h"
#include "clipwarden/report.h"

namespace clipwarden {

struct Thumbnail;  // clipwarden/html_report.h

// One clip of a batch.
struct GateInput {
  int64_t index = 0;      // position in the whole (unsharded) input list
  std::string path;       // the clip: a video file or a folder of frames
  std::string id;         // manifest "id", else `path`; shards hash it
  std::string prompt_id;  // "" when not given
  std::string model;      // "" when not given
  nlohmann::json seed;    // null when not given
  nlohmann::json metadata = nlohmann::json::object();  // other manifest fields, as given
  std::string origin;       // "manifest.jsonl:12" for manifest lines, else ""
  std::string output_name;  // report file stem, unique in the batch (set by the caller)
};

struct CollectedInputs {
  std::vector<GateInput> inputs;
  std::vector<std::string> warnings;  // e.g. a clip named twice (kept once)
};

// Expands INPUT arguments in order: a `.jsonl` file is a manifest (one JSON
// object per line with "path", optional "id", "prompt_id", "model", "seed"
// and free fields; relative paths resolve against the manifest's folder); a
// folder is searched recursively for video files (by extension) and folders
// of numbered frames, in name order (a folder named like a video file that
// holds no clips is taken as a clip, so it is reported, not dropped; a
// folder argument with no clips at all gives a warning); anything else is a clip (a missing one
// is recorded as an unreadable input when the batch runs). A bad manifest
// line or a repeated manifest id is a usage error naming the file and line.
Expected<CollectedInputs> collect_inputs(const std::vector<std::string>& args);

// --shard I/N: 0-based I. The share of a clip is shard_of(id, N).
struct ShardSpec {
  int index = 0;
  int count = 1;
};
// "I/N" with 0 <= I < N, or "auto/N": I from JOB_COMPLETION_INDEX
// (Kubernetes indexed Job) or SLURM_ARRAY_TASK_ID (Slurm job array, which
// must count from 0: --array=0-N-1), read through `getenv`.
Expected<ShardSpec> parse_shard(const std::string& text,
                                const std::function<const char*(const char*)>& getenv);
// FNV-1a 64 of the id, mixed by the splitmix64 finalizer (so every bit of
// the hash reaches the low bits used by the modulo), modulo `count`.
uint64_t shard_hash(const std::string& id);
uint64_t fnv1a_64(std::string_view bytes);
int shard_of(const std::string& id, int count);
std::vector<GateInput> select_shard(const std::vector<GateInput>& inputs, const ShardSpec& shard);

// What a shard run leaves in its output folder (DIR/shard.json, fields in
// docs/gate.md) so that merge can tell a missing or unfinished shard from a
// complete one: a cancelled array task leaves no folder at all, a killed
// one leaves a queue of only the clips it finished.
struct ShardRecord {
  ShardSpec shard;
  int64_t inputs = 0;         // clips in the whole input list
  std::string inputs_sha256;  // of the whole list's ids, one per line: one batch's shards agree
  int64_t clips = 0;          // clips in this shard's share
  bool finished = false;      // every clip of the share is in the queue
};
// The record of `shard` of `all_inputs` (the list before sharding), unfinished.
ShardRecord shard_record(const std::vector<GateInput>& all_inputs, const ShardSpec& shard);
Status write_shard_record(const std::string& out_dir, const ShardRecord& record);
// nullopt when DIR holds no shard.json (a run without --shard).
Expected<std::optional<ShardRecord>> read_shard_record(const std::string& dir);
// Merge's check: either no folder is a shard, or together they hold every
// shard 0..N-1 of one input list exactly once, each finished with its whole
// share in its queue. The error names the missing or unfinished shard.
Status check_shard_set(const std::vector<std::string>& dirs);

// The outcome for one clip: a queue line.
struct ClipResult {
  GateInput input;
  std::optional<Verdict> verdict;  // nullopt when the clip could not be judged
  double coherence = kUndefined;
  std::vector<std::string> reasons;
  std::string report;  // JSON report path relative to the output folder, "" if none
  std::optional<Error> error;
  bool from_store = false;  // taken from the results store, not recomputed
  std::string sha256;       // content hash, "" if the clip could not be read
};

// "pass", "review", "reject" or "error".
std::string queue_status(const ClipResult& result);
// One queue.jsonl line (fields in docs/gate.md) and back.
nlohmann::json queue_line(const ClipResult& result);
Expected<ClipResult> clip_result_from_queue_line(const nlohmann::json& line,
                                                 const std::string& subject);

struct GateCounts {
  int total = 0;
  int pass = 0;
  int review = 0;
  int reject = 0;
  int error = 0;
  int from_store = 0;
  void add(const ClipResult& r);
};

struct GateRun {
  std::vector<ClipResult> results;  // in input order; only finished clips when stopped
  GateCounts counts;
  std::vector<std::string> warnings;  // e.g. a store row that could not be written
  bool stopped = false;  // GateOptions::stop was set before the batch finished
  int abandoned = 0;     // clips in flight when the grace time ran out (not in results)
  int not_started = 0;   // clips never started because of the stop
};

using AnalyzeFunction = std::function<Expected<Report>(
    const std::string& path, const AnalysisSettings&, const Policy&, const AnalysisHooks&)>;
// `thumbnails`: the page's thumbnails kept while the clip was analysed
// (GateOptions::collect_thumbnails), so writing the page need not decode the
// whole clip again; null when not collected or when the report came from
// the results store.
using ReportWriter = std::function<Status(const Report& report, const std::string& base_path,
                                          const std::vector<Thumbnail>* thumbnails)>;

struct GateOptions {
  AnalysisSettings settings;  // settings.threads = 0: max(1, cores / jobs) per clip
  Policy policy = default_policy();
  std::string out_dir;
  std::string db_path;        // "" = out_dir/clipwarden.db
  int jobs = 0;               // clips analysed at once; 0 = number of cores
  AnalyzeFunction analyze;    // empty = analyze_clip
  ReportWriter write_report;  // empty = JSON only (base_path + ".json")
  bool collect_thumbnails = false;  // keep HTML thumbnails during analysis for write_report
  // Set from outside (e.g. by a signal handler) to stop the batch: no clip
  // starts once it is set; the clips in flight get stop_grace_s to finish
  // and are then abandoned: run_gate writes the queue of the finished clips
  // and returns while their workers still run (GateRun::abandoned > 0); the
  // process should then exit without waiting for them (std::_Exit). An
  // abandoned clip is left as after kill -9: rerunning finishes it.
  const std::atomic<bool>* stop = nullptr;
  double stop_grace_s = 5;
  // A shard's record: written to out_dir/shard.json unfinished when the
  // batch starts and finished once every clip is in the queue.
  std::optional<ShardRecord> shard;
};

struct GateObserver {
  // A clip finished (called on a worker thread, one call at a time).
  std::function<void(const ClipResult& result, const GateCounts& so_far)> on_clip_done;
};

// Runs the batch: for each input, its content hash is looked up in the store
// (a hit re-reads the stored report; a miss, or a stored report that no
// longer exists, analyses the clip and adds a row), its report is written to
// out_dir/<output_name>.json, and queue.jsonl + index.html are refreshed as
// clips finish and written once more at the end. Fails only when the output
// folder or the store cannot be used.
Expected<GateRun> run_gate(const std::vector<GateInput>& inputs, const GateOptions& options,
                           const GateObserver& observer = {});

// Writes out_dir/queue.jsonl (input order) and out_dir/index.html (worst
// first), each atomically.
Status write_queue_outputs(const std::string& out_dir, const std::vector<ClipResult>& results);

// Reads DIR/queue.jsonl (a usage error when there is none; a bad line is an
// input error naming the file and line).
// `check`, when given, sees each entry with its place ("DIR/queue.jsonl:LINE")
// and may refuse it; its error ends the reading.
using QueueLineCheck = std::function<Status(const ClipResult&, const std::string& where)>;
Expected<std::vector<ClipResult>> read_queue(const std::string& dir,
                                             const QueueLineCheck& check = {});

// Joins the outputs of shard runs (their queue.jsonl, reports and
// clipwarden.db) into out_dir: one queue in input order without duplicates,
// one store, one index page. Reports whose names collide get a new name.
Expected<GateRun> merge_gate_outputs(const std::vector<std::string>& shard_dirs,
                                     const std::string& out_dir);

}  // namespace clipwarden
