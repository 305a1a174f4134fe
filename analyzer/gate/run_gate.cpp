// Running a batch: a pool of `jobs` workers takes clips in input order;
// each clip is hashed, looked up in the store, analysed if needed, written,
// recorded in the store (one transaction) and reported to the observer.
// Before analysing, a worker claims the clip in the store; a clip another
// gate (or another worker) is analysing right now is put aside and taken up
// again after the rest, waiting then for that analysis's row, so two gates
// sharing one store never both analyse a clip.
// queue.jsonl and index.html are refreshed as clips finish, so a run killed
// at any moment leaves a consistent queue of the clips finished so far, and
// rerunning the same command takes those from the store.
//
// Stopping (GateOptions::stop, set e.g. by the CLI's SIGINT/SIGTERM handler):
// no clip starts after the flag is seen; the clips in flight get
// stop_grace_s to finish and are then abandoned. An abandoned clip is in the
// same state as after kill -9 (its report, if any, was renamed into place
// whole; its store row is one transaction, committed or not), so the queue
// is written once more with the finished clips and the caller may exit at
// once. The worker threads then still run: everything they touch is owned
// by a shared Batch, never by the caller's stack.
#include <signal.h>
#include <unistd.h>

#include <atomic>
#include <cerrno>
#include <chrono>
#include <condition_variable>
#include <cstdlib>
#include <deque>
#include <filesystem>
#include <memory>
#include <mutex>
#include <thread>

#include "analyzer/gate/folder_lock.h"
#include "analyzer/inspect/page_pictures.h"
#include "clipwarden/gate.h"
#include "clipwarden/html_report.h"
#include "clipwarden/report_io.h"
#include "analyzer/store/result_store.h"
#include "analyzer/store/hashing.h"
#include "clipwarden/version.h"

namespace clipwarden {
namespace {

namespace fs = std::filesystem;

// Rewriting the whole queue costs O(clips); at most once a second keeps a
// batch of many quick store hits linear in practice.
constexpr auto kRefreshInterval = std::chrono::seconds(1);

struct Batch {
  // Copies, not references: abandoned workers may outlive run_gate's caller.
  std::vector<GateInput> inputs;
  GateOptions options;
  AnalysisSettings settings;  // with the per-clip thread count
  std::shared_ptr<ResultStore> store;
  std::string settings_hash;
  AnalyzeFunction analyze;
  ReportWriter write_report;
  GateObserver observer;
  std::atomic<size_t> next{0};

  std::mutex mutex;  // guards everything below
  std::condition_variable worker_done;
  int workers_running = 0;
  std::deque<size_t> deferred;  // clips claimed elsewhere, taken up after the rest
  int in_flight = 0;
  bool abandoned = false;  // the caller has gone: record nothing more
  std::vector<std::optional<ClipResult>> results;
  GateCounts counts;
  std::chrono::steady_clock::time_point last_refresh{};
  std::vector<std::string> warnings;

  bool stop_requested() const { return options.stop && options.stop->load(); }
};

void take_verdict(const Report& report, ClipResult& r) {
  r.verdict = report.verdict.status;
  r.coherence = report.summary.coherence;
  r.reasons = report.verdict.reasons;
}

// A stored analysis whose report still exists: rewrite it under this batch's
// name (the store may be shared with other output folders).
bool take_from_store(Batch& b, const StoredAnalysis& row, const std::string& base, ClipResult& r) {
  auto report = read_report_file(row.report_path);
  if (!report) return false;  // moved or deleted: recompute
  report->clip.path = r.input.path;
  if (report->clip.sha256.empty()) report->clip.sha256 = r.sha256;  // see analyse_and_store
  auto written = b.write_report(*report, base, nullptr);
  if (!written) {
    r.error = written.error();
    return true;
  }
  take_verdict(*report, r);
  r.from_store = true;
  return true;
}

void analyse_and_store(Batch& b, const std::string& base, ClipResult& r) {
  const GateInput& in = r.input;
  // Thumbnails taken from the analysis' own frames: without them the page
  // would decode the whole clip a second time.
  std::optional<ThumbnailCollector> thumbnails;
  AnalysisHooks hooks;
  if (b.options.collect_thumbnails) {
    thumbnails.emplace();
    hooks.on_frame = [&](const DecodedFrame& frame) { thumbnails->add(frame); };
  }
  auto report = b.analyze(in.path, b.settings, b.options.policy, hooks);
  if (!report) {
    r.error = report.error();
    return;
  }
  // A frame folder has no file hash of its own: its report carries the
  // content hash the queue and store use, so merge can match the two.
  if (report->clip.sha256.empty()) report->clip.sha256 = r.sha256;
  auto written = b.write_report(*report, base, thumbnails ? &thumbnails->thumbnails() : nullptr);
  if (!written) {
    r.error = written.error();
    return;
  }
  take_verdict(*report, r);
  StoredAnalysis row;
  row.content_sha256 = r.sha256;
  row.settings_hash = b.settings_hash;
  row.tool_version = version();
  row.clip_id = in.id;
  row.clip_path = in.path;
  row.model = in.model;
  row.prompt_id = in.prompt_id;
  row.verdict = report->verdict.status;
  row.coherence = report->summary.coherence;
  row.reasons = report->verdict.reasons;
  row.summary = report_to_json(*report)["summary"];
  row.report_path = fs::absolute(base + ".json").lexically_normal().string();
  if (auto st = b.store->insert(row); !st) {
    std::lock_guard lock(b.mutex);
    b.warnings.push_back(st.error().message());
  }
}

constexpr auto kClaimPoll = std::chrono::milliseconds(200);

// The stored analysis of r's clip, or the claim to make it. Returns false
// when another process (or worker) holds the claim and `wait` is false; with
// `wait`, polls until that analysis is stored or its claim is released
// (e.g. its process ended), or the batch is stopping (false).
bool find_or_claim(Batch& b, ClipResult& r, std::optional<StoredAnalysis>& found, bool& claimed,
                   bool wait) {
  for (;;) {
    auto hit = b.store->find(r.sha256, b.settings_hash);
    if (!hit) {
      r.error = hit.error();
      return true;
    }
    if (*hit) {
      found = std::move(*hit);
      return true;
    }
    auto mine = b.store->claim(r.sha256, b.settings_hash);
    if (!mine) {
      r.error = mine.error();
      return true;
    }
    if (*mine == ResultStore::Claim::taken) {
      claimed = true;
      return true;
    }
    // Not claimed: held by another, or stored meanwhile (look again first).
    auto stored = b.store->find(r.sha256, b.settings_hash);
    if (stored && *stored) {
      found = std::move(*stored);
      return true;
    }
    if (!wait || b.stop_requested()) return false;
    std::this_thread::sleep_for(kClaimPoll);
  }
}

// The clip's result, or nothing when it is deferred (claimed elsewhere and
// `wait` false) or the batch stopped while waiting.
std::optional<ClipResult> judge(Batch& b, const GateInput& in, bool wait) {
  ClipResult r;
  r.input = in;
  auto sha = content_sha256(in.path);
  if (!sha) {
    r.error = sha.error();
    return r;
  }
  r.sha256 = *sha;
  const std::string base = (fs::path(b.options.out_dir) / in.output_name).string();
  std::optional<StoredAnalysis> found;
  bool claimed = false;
  if (!find_or_claim(b, r, found, claimed, wait)) return std::nullopt;
  if (r.error) return r;
  if (!found || !take_from_store(b, *found, base, r)) {
    if (!claimed) {  // the stored report is gone: analysed again, claimed if free
      auto mine = b.store->claim(r.sha256, b.settings_hash);
      claimed = mine && *mine == ResultStore::Claim::taken;
    }
    analyse_and_store(b, base, r);
  }
  if (claimed)
    if (auto st = b.store->release(r.sha256, b.settings_hash); !st) {
      std::lock_guard lock(b.mutex);
      b.warnings.push_back(st.error().message());
    }
  if (!r.error) r.report = in.output_name + ".json";
  return r;
}

std::vector<ClipResult> finished(const Batch& b) {
  std::vector<ClipResult> out;
  for (const auto& r : b.results)
    if (r) out.push_back(*r);
  return out;
}

void record(Batch& b, size_t i, ClipResult r) {
  std::lock_guard lock(b.mutex);
  --b.in_flight;
  if (b.abandoned) return;  // the queue was written without it; the store may hold it
  b.counts.add(r);
  b.results[i] = std::move(r);
  if (b.observer.on_clip_done) b.observer.on_clip_done(*b.results[i], b.counts);
  const auto now = std::chrono::steady_clock::now();
  if (now - b.last_refresh >= kRefreshInterval) {
    b.last_refresh = now;
    if (auto st = write_queue_outputs(b.options.out_dir, finished(b)); !st)
      b.warnings.push_back(st.error().message());
  }
}

struct Next {
  size_t index;
  bool deferred;  // taken up again after the rest: wait for its claim
};

// Takes the next clip (input order, then the deferred ones) unless the
// batch is done or stopping.
std::optional<Next> take_next(Batch& b) {
  std::lock_guard lock(b.mutex);
  if (b.stop_requested() || b.abandoned) return std::nullopt;
  std::optional<Next> next;
  if (b.next < b.inputs.size()) {
    next = Next{b.next++, false};
  } else if (!b.deferred.empty()) {
    next = Next{b.deferred.front(), true};
    b.deferred.pop_front();
  } else {
    return std::nullopt;
  }
  ++b.in_flight;
  return next;
}

void put_aside(Batch& b, size_t i) {
  std::lock_guard lock(b.mutex);
  --b.in_flight;
  if (!b.abandoned && !b.stop_requested()) b.deferred.push_back(i);
}

void worker(std::shared_ptr<Batch> batch) {
  Batch& b = *batch;
  while (auto next = take_next(b)) {
    const size_t i = next->index;
    std::optional<ClipResult> r;
    try {
      r = judge(b, b.inputs[i], /*wait=*/next->deferred);
    } catch (const std::exception& e) {  // a library below threw: record it, keep going
      r = ClipResult{};
      r->input = b.inputs[i];
      r->error = Error{ErrorKind::internal, b.inputs[i].path,
                       std::string("unexpected failure: ") + e.what()};
    }
    if (r)
      record(b, i, std::move(*r));
    else
      put_aside(b, i);  // claimed elsewhere (or stopping while waiting for it)
  }
  std::lock_guard lock(b.mutex);
  --b.workers_running;
  b.worker_done.notify_all();
}

// Waits for the workers; once a stop is requested, at most stop_grace_s more.
// True when they all finished, false when the ones still running were
// abandoned (b.abandoned is then set, under the lock held by `lock`).
bool wait_for_workers(Batch& b, std::unique_lock<std::mutex>& lock) {
  using clock = std::chrono::steady_clock;
  std::optional<clock::time_point> give_up_at;
  while (b.workers_running > 0) {
    if (!give_up_at && b.stop_requested())
      give_up_at = clock::now() + std::chrono::duration_cast<clock::duration>(
                                      std::chrono::duration<double>(b.options.stop_grace_s));
    if (give_up_at && clock::now() >= *give_up_at) {
      b.abandoned = true;
      return false;
    }
    b.worker_done.wait_for(lock, std::chrono::milliseconds(50));
  }
  return true;
}

// Temporary files of atomic writes (".tmp-NAME-PID-N") left by a process
// that no longer runs, e.g. one killed with SIGKILL mid-write.
void remove_stale_temporaries(const std::string& out_dir) {
  std::error_code ec;
  for (const auto& e : fs::directory_iterator(out_dir, ec)) {
    const std::string name = e.path().filename().string();
    if (name.rfind(".tmp-", 0) != 0) continue;
    const size_t dash = name.rfind('-');
    const size_t before = dash == std::string::npos ? dash : name.rfind('-', dash - 1);
    if (before == std::string::npos) continue;
    const long pid = std::strtol(name.c_str() + before + 1, nullptr, 10);
    if (pid > 0 && pid != ::getpid() && ::kill(static_cast<pid_t>(pid), 0) != 0 && errno == ESRCH)
      fs::remove(e.path(), ec);
  }
}

}  // namespace

Expected<GateRun> run_gate(const std::vector<GateInput>& inputs, const GateOptions& options,
                           const GateObserver& observer) {
  std::error_code ec;
  const bool made_out_dir = !fs::exists(options.out_dir, ec);
  fs::create_directories(options.out_dir, ec);
  if (ec) return output_error(options.out_dir, "cannot create output folder: " + ec.message());
  // Held until run_gate returns (after a stop with abandoned workers the
  // caller exits right away).
  auto folder_lock = FolderLock::take(options.out_dir);
  if (!folder_lock) return folder_lock.error();
  const std::string db_path = options.db_path.empty()
                                  ? (fs::path(options.out_dir) / "clipwarden.db").string()
                                  : options.db_path;
  // SQLite writes journal files beside the store ("/dev/null-wal"): a
  // device or pipe as --db would leave them wherever that is.
  if (fs::exists(db_path, ec) && !fs::is_regular_file(db_path, ec))
    return usage_error(db_path, "the results store must be a regular file");
  auto opened = ResultStore::open(db_path);
  if (!opened) {
    // Nothing was judged: a folder this run made is not left behind empty
    // (the lock file goes too; the lock itself holds until we return).
    if (made_out_dir) {
      fs::remove(FolderLock::file_in(options.out_dir), ec);
      fs::remove(options.out_dir, ec);  // only if empty
    }
    return opened.error();
  }
  remove_stale_temporaries(options.out_dir);
  if (options.shard) {
    ShardRecord started = *options.shard;
    started.finished = false;  // a rerun into a finished shard's folder is unfinished until done
    if (auto st = write_shard_record(options.out_dir, started); !st) return st.error();
  }

  const int cores = std::max(1u, std::thread::hardware_concurrency());
  int jobs = options.jobs > 0 ? options.jobs : cores;
  jobs = std::max(1, std::min<int>(jobs, static_cast<int>(inputs.size())));

  auto batch = std::make_shared<Batch>();
  Batch& b = *batch;
  b.inputs = inputs;
  b.options = options;
  b.settings = options.settings;
  if (b.settings.threads <= 0) b.settings.threads = std::max(1, cores / jobs);
  b.store = std::shared_ptr<ResultStore>(std::move(*opened));
  b.settings_hash = settings_hash(options.settings, options.policy);
  b.analyze = options.analyze ? options.analyze : AnalyzeFunction(analyze_clip);
  b.write_report =
      options.write_report ? options.write_report
                           : [](const Report& r, const std::string& base, const std::vector<Thumbnail>*) {
                               return write_json_report(r, base + ".json");
                             };
  b.observer = observer;
  b.results.resize(inputs.size());
  b.workers_running = jobs;

  std::vector<std::thread> pool;
  for (int j = 0; j < jobs; ++j) pool.emplace_back(worker, batch);
  std::unique_lock lock(b.mutex);
  const bool all_joined = wait_for_workers(b, lock);

  GateRun run;
  run.results = finished(b);
  run.counts = b.counts;
  run.warnings = b.warnings;
  run.abandoned = all_joined ? 0 : b.in_flight;
  run.not_started = static_cast<int>(inputs.size()) - run.counts.total - run.abandoned;
  run.stopped = b.stop_requested() && run.not_started + run.abandoned > 0;
  // Written under the lock: an abandoned worker can no longer overwrite it.
  auto written = write_queue_outputs(options.out_dir, run.results);
  lock.unlock();
  for (auto& t : pool) all_joined ? t.join() : t.detach();
  if (!written) return written.error();
  if (options.shard && !run.stopped && run.counts.total == static_cast<int>(inputs.size())) {
    ShardRecord done = *options.shard;
    done.finished = true;
    if (auto st = write_shard_record(options.out_dir, done); !st) return st.error();
  }
  return run;
}

}  // namespace clipwarden
