// Running a batch: a pool of `jobs` workers takes clips in input order;
// each clip is hashed, looked up in the store, analysed if needed, written,
// recorded in the store (one transaction) and reported to the observer.
// queue.jsonl and index.html are refreshed as clips finish, so a run killed
// at any moment leaves a consistent queue of the clips finished so far, and
// rerunning the same command takes those from the store.
#include <atomic>
#include <chrono>
#include <filesystem>
#include <mutex>
#include <thread>

#include "framelint/gate.h"
#include "framelint/report_io.h"
#include "framelint/store.h"
#include "framelint/version.h"

namespace framelint {
namespace {

namespace fs = std::filesystem;

// Rewriting the whole queue costs O(clips); at most once a second keeps a
// batch of many quick store hits linear in practice.
constexpr auto kRefreshInterval = std::chrono::seconds(1);

struct Batch {
  const std::vector<GateInput>& inputs;
  const GateOptions& options;
  AnalysisSettings settings;  // with the per-clip thread count
  ResultStore& store;
  std::string settings_hash;
  AnalyzeFunction analyze;
  ReportWriter write_report;
  const GateObserver& observer;

  std::mutex mutex;  // guards everything below
  std::vector<std::optional<ClipResult>> results;
  GateCounts counts;
  std::chrono::steady_clock::time_point last_refresh{};
  std::vector<std::string> warnings;
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
  auto written = b.write_report(*report, base);
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
  auto report = b.analyze(in.path, b.settings, b.options.policy, AnalysisHooks{});
  if (!report) {
    r.error = report.error();
    return;
  }
  auto written = b.write_report(*report, base);
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
  if (auto st = b.store.insert(row); !st) {
    std::lock_guard lock(b.mutex);
    b.warnings.push_back(st.error().message());
  }
}

ClipResult judge(Batch& b, const GateInput& in) {
  ClipResult r;
  r.input = in;
  auto sha = content_sha256(in.path);
  if (!sha) {
    r.error = sha.error();
    return r;
  }
  r.sha256 = *sha;
  const std::string base = (fs::path(b.options.out_dir) / in.output_name).string();
  auto hit = b.store.find(r.sha256, b.settings_hash);
  if (!hit) {
    r.error = hit.error();
    return r;
  }
  if (!*hit || !take_from_store(b, **hit, base, r)) analyse_and_store(b, base, r);
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

void worker(Batch& b, std::atomic<size_t>& next) {
  for (size_t i = next++; i < b.inputs.size(); i = next++) {
    ClipResult r;
    try {
      r = judge(b, b.inputs[i]);
    } catch (const std::exception& e) {  // a library below threw: record it, keep going
      r = ClipResult{};
      r.input = b.inputs[i];
      r.error = Error{ErrorKind::internal, b.inputs[i].path,
                      std::string("unexpected failure: ") + e.what()};
    }
    record(b, i, std::move(r));
  }
}

}  // namespace

Expected<GateRun> run_gate(const std::vector<GateInput>& inputs, const GateOptions& options,
                           const GateObserver& observer) {
  std::error_code ec;
  fs::create_directories(options.out_dir, ec);
  if (ec) return output_error(options.out_dir, "cannot create output folder: " + ec.message());
  const std::string db_path = options.db_path.empty()
                                  ? (fs::path(options.out_dir) / "framelint.db").string()
                                  : options.db_path;
  auto store = ResultStore::open(db_path);
  if (!store) return store.error();

  const int cores = std::max(1u, std::thread::hardware_concurrency());
  int jobs = options.jobs > 0 ? options.jobs : cores;
  jobs = std::max(1, std::min<int>(jobs, static_cast<int>(inputs.size())));
  AnalysisSettings settings = options.settings;
  if (settings.threads <= 0) settings.threads = std::max(1, cores / jobs);

  AnalyzeFunction analyze = options.analyze ? options.analyze : AnalyzeFunction(analyze_clip);
  ReportWriter write_report =
      options.write_report ? options.write_report : [](const Report& r, const std::string& base) {
        return write_json_report(r, base + ".json");
      };
  Batch batch{inputs,
              options,
              settings,
              **store,
              settings_hash(options.settings, options.policy),
              std::move(analyze),
              std::move(write_report),
              observer};
  batch.results.resize(inputs.size());

  std::atomic<size_t> next{0};
  std::vector<std::thread> pool;
  for (int j = 1; j < jobs; ++j) pool.emplace_back(worker, std::ref(batch), std::ref(next));
  worker(batch, next);
  for (auto& t : pool) t.join();

  GateRun run;
  run.results = finished(batch);
  run.counts = batch.counts;
  run.warnings = std::move(batch.warnings);
  if (auto st = write_queue_outputs(options.out_dir, run.results); !st) return st.error();
  return run;
}

}  // namespace framelint
