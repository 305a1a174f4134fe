#include "support/drift_pairs.h"

#include <cmath>
#include <filesystem>
#include <limits>

#include "analyzer/flow/pair_builder.h"
#include "analyzer/metrics/metric.h"

namespace clipwarden {
std::unique_ptr<Metric> make_drift_metric(const AnalysisSettings& settings);
}

namespace clipwarden::test {

Report run_drift_on_frames(const std::vector<cv::Mat>& frames, double fps,
                           const AnalysisSettings& settings) {
  auto metric = make_drift_metric(settings);
  Report report;
  const auto columns = metric->columns();
  for (const auto& c : columns) {
    report.series.push_back({c, std::vector<double>(frames.size(), kUndefined)});
  }
  std::vector<double> row(columns.size());
  PairBuilder builder(settings.preset);
  FramePlanes prev, cur;
  FramePair pair;
  for (size_t i = 0; i < frames.size(); ++i) {
    const double t = static_cast<double>(i) / fps;
    report.frame_times_s.push_back(t);
    prepare_planes(static_cast<int64_t>(i), t, frames[i], cur);
    std::fill(row.begin(), row.end(), kUndefined);
    if (i == 0) {
      metric->measure_first(cur, row);
    } else {
      builder.build(prev, cur, pair);
      metric->measure_pair(pair, row);
      if (metric->needs_in_order()) metric->observe_in_order(pair, row);
    }
    for (size_t c = 0; c < columns.size(); ++c) report.series[c].values[i] = row[c];
    std::swap(prev, cur);
  }
  metric->finish(report);
  return report;
}

std::string opencv_sample(const std::string& name) {
  const std::string path = "/usr/share/doc/opencv-doc/examples/data/" + name;
  return std::filesystem::exists(path) ? path : "";
}

const TrackedObject* object_at(const Report& report, const cv::Rect2f& where, int64_t frame) {
  const TrackedObject* best = nullptr;
  double best_share = 0;
  for (const auto& o : report.objects) {
    for (const auto& look : o.samples) {
      if (look.frame != frame) continue;
      const cv::Rect2d box(look.box_px.x, look.box_px.y, look.box_px.width, look.box_px.height);
      const double share = (box & cv::Rect2d(where)).area() / std::max(1.0, box.area());
      if (share > best_share) best_share = share, best = &o;
    }
  }
  return best;
}

double object_value(const TrackedObject& object, double TrackedSample::*value, int64_t frame) {
  double found = std::numeric_limits<double>::quiet_NaN();
  int64_t best = std::numeric_limits<int64_t>::max();
  for (const auto& look : object.samples) {
    const int64_t gap = std::llabs(look.frame - frame);
    if (gap < best && std::isfinite(look.*value)) best = gap, found = look.*value;
  }
  return found;
}

}  // namespace clipwarden::test
