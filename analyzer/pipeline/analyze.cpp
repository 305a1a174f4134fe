// analyze_clip: the whole analysis of one clip.
//   decoder thread -> FramePlanes -> worker pool (one PairBuilder each):
//   flow, occlusion, warp, per-pair metrics -> in-order stage (stateful
//   metrics) -> per-frame rows. Then finish, segments, summary, verdict.
// At most `window` pairs are in flight, so memory is bounded by the window,
// never by clip length; results do not depend on the thread count because
// every pair is computed the same way and rows are committed in order.
#include <algorithm>
#include <chrono>
#include <deque>
#include <future>
#include <thread>

#include "analyzer/flow/pair_builder.h"
#include "analyzer/metrics/metric.h"
#include "analyzer/pipeline/frame_stream.h"
#include "analyzer/pipeline/report_assembly.h"
#include "analyzer/pipeline/worker_pool.h"
#include "clipwarden/analysis.h"

namespace clipwarden {
namespace {

using Clock = std::chrono::steady_clock;
double ms_since(Clock::time_point start) {
  return std::chrono::duration<double, std::milli>(Clock::now() - start).count();
}

// Thread time per stage, one record per worker so no locking is needed.
struct StageClock {
  double pair_ms = 0;
  std::vector<double> metric_ms;
};

struct PairJob {
  std::shared_ptr<const FramePlanes> prev, cur;
  FramePair pair;
  std::vector<double> row;
  std::promise<void> done;
};

class Analysis {
 public:
  Analysis(const AnalysisSettings& settings, int workers)
      : metrics_(make_metrics(settings)), table_(metrics_), pool_(workers, 2 * workers + 2) {
    builders_.reserve(workers);
    for (int i = 0; i < workers; ++i) builders_.push_back(std::make_unique<PairBuilder>(settings.preset));
    clocks_.assign(workers + 1, StageClock{0, std::vector<double>(metrics_.size(), 0.0)});
    for (const auto& m : metrics_) needs_in_order_ = needs_in_order_ || m->needs_in_order();
    // Every pair in flight holds its flows, warps and metric scratch (~10 MB
    // at the 512 px working size): one pair per worker plus one waiting for
    // the next free worker is enough to keep them busy, since pairs cost
    // about the same; twice that held 20 MB more at two workers.
    window_ = static_cast<size_t>(workers + 1);
  }

  void add_frame(std::shared_ptr<const FramePlanes> frame) {
    if (!prev_) {
      std::vector<double> row(table_.width(), kUndefined);
      for (size_t m = 0; m < metrics_.size(); ++m) metrics_[m]->measure_first(*frame, table_.slot(row, m));
      table_.append(frame->t_s, std::move(row));
    } else {
      // The oldest pair is committed before the next is taken on, so at
      // most `window_` jobs (and their buffers) ever exist.
      while (in_flight_.size() >= window_) commit_oldest();
      std::shared_ptr<PairJob> job = take_job();
      job->prev = prev_;
      job->cur = frame;
      job->row.assign(table_.width(), kUndefined);
      pool_.submit([this, job](int worker) {
        StageClock& clock = clocks_[worker];
        auto start = Clock::now();
        builders_[worker]->build(*job->prev, *job->cur, job->pair);
        clock.pair_ms += ms_since(start);
        for (size_t m = 0; m < metrics_.size(); ++m) {
          start = Clock::now();
          metrics_[m]->measure_pair(job->pair, table_.slot(job->row, m));
          clock.metric_ms[m] += ms_since(start);
        }
        job->done.set_value();
      });
      in_flight_.push_back(std::move(job));
    }
    prev_ = std::move(frame);
  }

  // Commits every pair still in flight; returns the finished columns.
  MetricTable& finish() {
    while (!in_flight_.empty()) commit_oldest();
    return table_;
  }
  std::vector<std::unique_ptr<Metric>>& metrics() { return metrics_; }

  void add_times(PipelineTimings& t) const {
    for (const auto& clock : clocks_) {
      t.pair_ms += clock.pair_ms;
      for (size_t m = 0; m < metrics_.size(); ++m) t.metric_ms[metrics_[m]->columns().front()] += clock.metric_ms[m];
    }
  }

 private:
  // Jobs are recycled once committed, so their flow, mask and warp buffers
  // are reused from pair to pair (window jobs exist at most).
  std::shared_ptr<PairJob> take_job() {
    if (spare_jobs_.empty()) return std::make_shared<PairJob>();
    std::shared_ptr<PairJob> job = std::move(spare_jobs_.back());
    spare_jobs_.pop_back();
    job->done = std::promise<void>();
    return job;
  }

  void commit_oldest() {
    std::shared_ptr<PairJob> job = std::move(in_flight_.front());
    in_flight_.pop_front();
    job->done.get_future().wait();
    if (needs_in_order_)
      for (size_t m = 0; m < metrics_.size(); ++m)
        if (metrics_[m]->needs_in_order()) {
          const auto start = Clock::now();
          metrics_[m]->observe_in_order(job->pair, table_.slot(job->row, m));
          clocks_.back().metric_ms[m] += ms_since(start);  // the in-order stage's own record
        }
    table_.append(job->cur->t_s, std::move(job->row));
    // The frames go back to the decoder's pool once no job holds them.
    job->pair.prev = job->pair.cur = nullptr;
    job->prev.reset();
    job->cur.reset();
    spare_jobs_.push_back(std::move(job));
  }

  std::vector<std::unique_ptr<Metric>> metrics_;
  MetricTable table_;
  std::vector<std::unique_ptr<PairBuilder>> builders_;
  std::vector<StageClock> clocks_;  // one per worker, plus the in-order stage
  WorkerPool pool_;  // declared after what its tasks use, so it is joined first
  std::deque<std::shared_ptr<PairJob>> in_flight_;
  std::vector<std::shared_ptr<PairJob>> spare_jobs_;
  std::shared_ptr<const FramePlanes> prev_;
  size_t window_ = 3;
  bool needs_in_order_ = false;
};

// Frames decoded ahead of the pairs: enough to absorb a slow frame of the
// decoder (an I-frame), each one a few MB at the working size.
constexpr size_t kDecodedFramesQueued = 2;

int worker_count(const AnalysisSettings& settings) {
  const int cores = static_cast<int>(std::max(1u, std::thread::hardware_concurrency()));
  return settings.threads > 0 ? settings.threads : cores;
}

}  // namespace

Expected<Report> analyze_clip(const std::string& path, const AnalysisSettings& settings, const Policy& policy,
                              const AnalysisHooks& hooks) {
  SourceOptions options;
  options.working_long_side = settings.working_long_side;
  options.folder_fps = settings.folder_fps;
  options.threads = std::min(2, worker_count(settings));
  auto source = ClipSource::open(path, options);
  if (!source) return source.error();
  return analyze_source(**source, path, settings, policy, hooks);
}

Expected<Report> analyze_source(ClipSource& source, const std::string& path, const AnalysisSettings& settings,
                                const Policy& policy, const AnalysisHooks& hooks) {
  const auto started = Clock::now();
  const int64_t expected = source.info().frame_count;
  Analysis analysis(settings, worker_count(settings));
  std::optional<Error> stopped;
  std::optional<Cadence> cadence;
  {
    FrameStream stream(source, kDecodedFramesQueued);
    int64_t done = 0;
    while (auto frame = stream.next()) {
      if (hooks.on_frame) hooks.on_frame(DecodedFrame{frame->index, frame->t_s, frame->bgr});
      analysis.add_frame(std::move(frame));
      if (hooks.on_progress) hooks.on_progress(++done, expected);
    }
    stopped = stream.error();
    cadence = stream.cadence().cadence(source.stream_facts().video_duration_s);
    if (hooks.timings) hooks.timings->decode_ms += stream.busy_ms();
  }
  MetricTable& table = analysis.finish();
  // A clip that cannot be read to its end is an input error (exit 3), like
  // one that cannot be opened: a verdict on part of a clip would mislead.
  if (stopped) return *stopped;
  if (table.frame_count() == 0) return input_error(path, "no video frames could be decoded");

  const auto finishing = Clock::now();
  ReportInputs inputs{path, settings, policy, source, std::move(cadence)};
  Report report = assemble_report(inputs, table, analysis.metrics());
  if (PipelineTimings* t = hooks.timings) {
    analysis.add_times(*t);
    t->finish_ms += ms_since(finishing);
    t->wall_ms += ms_since(started);
    t->frames += report.clip.frame_count;
  }
  return report;
}

}  // namespace clipwarden
