// clipwarden_metric_bench: per-metric CPU time per frame, without decoding or
// flow in the measurement. Decodes the first N frames of a clip, builds
// their pairs once and keeps them in memory, then runs every metric (fresh
// instances each round) over the stored pairs: measure_pair and
// observe_in_order, timed separately with the thread's CPU clock
// (CLOCK_THREAD_CPUTIME_ID), so other processes on a shared machine do not
// inflate the figures. Prints the minimum over the rounds. As in the
// pipeline, a few FramePair objects are reused in turn, so per-pair scratch
// (FramePair::scratch) is reused rather than allocated for every pair.
//
//   clipwarden_metric_bench CLIP [--frames N] [--rounds R] [--only NAME]
#include <time.h>

#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <limits>
#include <map>
#include <memory>
#include <string>
#include <vector>

#include <opencv2/core/utility.hpp>

#include "analyzer/cli/args.h"
#include "analyzer/flow/pair_builder.h"
#include "analyzer/metrics/metric.h"
#include "clipwarden/analysis.h"
#include "clipwarden/clip_source.h"

using namespace clipwarden;

namespace {

double thread_ms() {
  timespec ts{};
  clock_gettime(CLOCK_THREAD_CPUTIME_ID, &ts);
  return ts.tv_sec * 1e3 + ts.tv_nsec * 1e-6;
}

}  // namespace

int main(int argc, char** argv) {
  // OpenCV runs on this thread only (as in the CLI), so the thread's CPU
  // clock also counts the work OpenCV calls do for the metrics.
  cv::setNumThreads(1);
  const auto parsed = cli::parse_args(std::vector<std::string>(argv + 1, argv + argc),
                                      {{"frames", true, "frames decoded (default 60)"},
                                       {"rounds", true, "rounds, the minimum is printed (default 5)"},
                                       {"only", true, "time this metric alone"}});
  if (!parsed || parsed->positionals.size() != 1) {
    std::fprintf(stderr, "usage: clipwarden_metric_bench CLIP [--frames N] [--rounds R] [--only NAME]%s%s\n",
                 parsed ? "" : ": ", parsed ? "" : parsed.error().message().c_str());
    return 2;
  }
  const std::string path = parsed->positionals[0];
  const int frames = std::atoi(parsed->get("frames").value_or("60").c_str());
  const int rounds = std::atoi(parsed->get("rounds").value_or("5").c_str());
  const std::string only = parsed->get("only").value_or("");
  AnalysisSettings settings;
  SourceOptions options;
  options.working_long_side = settings.working_long_side;
  options.threads = 1;
  auto source = ClipSource::open(path, options);
  if (!source) {
    std::fprintf(stderr, "%s\n", source.error().message().c_str());
    return 3;
  }
  std::vector<std::unique_ptr<FramePlanes>> planes;
  DecodedFrame frame;
  while (static_cast<int>(planes.size()) < frames) {
    auto more = (*source)->read(frame);
    if (!more || *more == FrameRead::end_of_clip) break;
    auto p = std::make_unique<FramePlanes>();
    prepare_planes(frame.index, frame.t_s, frame.bgr.clone(), *p);
    planes.push_back(std::move(p));
  }
  PairBuilder builder(settings.preset);
  std::vector<FramePair> pairs(planes.size() > 1 ? planes.size() - 1 : 0);
  for (size_t i = 0; i < pairs.size(); ++i) builder.build(*planes[i], *planes[i + 1], pairs[i]);
  std::printf("%s: %zu pairs at %dx%d, min of %d rounds, ms per pair (thread CPU time)\n",
              path.c_str(), pairs.size(), planes.empty() ? 0 : planes[0]->bgr.cols,
              planes.empty() ? 0 : planes[0]->bgr.rows, rounds);
  std::map<std::string, std::pair<double, double>> best;  // name -> (measure, in order)
  for (int r = 0; r < rounds; ++r) {
    std::vector<FramePair> jobs(3);  // reused in turn, like the pipeline's jobs
    auto job_for = [&](size_t i) -> const FramePair& {
      FramePair& job = jobs[i % jobs.size()];
      PairScratch keep = job.scratch;
      job = pairs[i];  // Mat headers only
      job.scratch = keep;
      return job;
    };
    auto metrics = make_metrics(settings);
    for (auto& m : metrics) {
      const std::string name = m->columns().front();
      if (!only.empty() && name != only) continue;
      std::vector<double> row(m->columns().size());
      double measure = 0, in_order = 0;
      for (size_t i = 0; i < pairs.size(); ++i) {
        const FramePair& pair = job_for(i);
        std::fill(row.begin(), row.end(), kUndefined);
        double t0 = thread_ms();
        m->measure_pair(pair, row);
        double t1 = thread_ms();
        if (m->needs_in_order()) m->observe_in_order(pair, row);
        double t2 = thread_ms();
        measure += t1 - t0;
        in_order += t2 - t1;
      }
      const double n = std::max<size_t>(1, pairs.size());
      auto it = best.find(name);
      if (it == best.end()) best[name] = {measure / n, in_order / n};
      else it->second = {std::min(it->second.first, measure / n), std::min(it->second.second, in_order / n)};
    }
  }
  std::printf("%-16s %10s %10s %10s\n", "metric", "pair", "in_order", "total");
  for (const auto& [name, t] : best)
    std::printf("%-16s %10.3f %10.3f %10.3f\n", name.c_str(), t.first, t.second, t.first + t.second);
  return 0;
}
