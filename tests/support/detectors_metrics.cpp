#include "support/detectors_metrics.h"

#include <algorithm>

#include "analyzer/flow/pair_builder.h"

namespace clipwarden::testing {

std::unique_ptr<Metric> registered_metric(const std::string& column) {
  for (auto& m : make_metrics(AnalysisSettings{})) {
    const auto cols = m->columns();
    if (std::find(cols.begin(), cols.end(), column) != cols.end()) return std::move(m);
  }
  return nullptr;
}

FramePlanes planes_of(int64_t index, double t_s, const cv::Mat& bgr) {
  FramePlanes p;
  prepare_planes(index, t_s, bgr, p);
  return p;
}

PairFiller real_pairs(Preset preset) {
  auto builder = std::make_shared<PairBuilder>(preset);
  return [builder](const FramePlanes& prev, const FramePlanes& cur, FramePair& pair) {
    builder->build(prev, cur, pair);
  };
}

Report run_metric(Metric& metric, const std::vector<FramePlanes>& frames, const PairFiller& fill,
                  const std::function<void(Report&)>& before_finish) {
  Report report;
  const auto cols = metric.columns();
  for (const auto& c : cols) report.series.push_back({c, std::vector<double>(frames.size(), kUndefined)});
  std::vector<double> row(cols.size());
  auto store = [&](size_t frame) {
    for (size_t c = 0; c < cols.size(); ++c) report.series[c].values[frame] = row[c];
  };
  for (size_t i = 0; i < frames.size(); ++i) {
    report.frame_times_s.push_back(frames[i].t_s);
    std::fill(row.begin(), row.end(), kUndefined);
    if (i == 0) {
      metric.measure_first(frames[0], row);
    } else {
      FramePair pair;
      pair.prev = &frames[i - 1];
      pair.cur = &frames[i];
      pair.dt_s = frames[i].t_s - frames[i - 1].t_s;
      fill(frames[i - 1], frames[i], pair);
      metric.measure_pair(pair, row);
      if (metric.needs_in_order()) metric.observe_in_order(pair, row);
    }
    store(i);
  }
  if (before_finish) before_finish(report);
  metric.finish(report);
  return report;
}

}  // namespace clipwarden::testing
