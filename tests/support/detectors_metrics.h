// Test helpers for the detectors: drive one metric through the order of a
// clip's analysis (analyzer/metrics/metric.h) without decoding a file.
#pragma once

#include <functional>
#include <memory>
#include <string>
#include <vector>

#include "analyzer/metrics/metric.h"

namespace clipwarden::testing {

// The registered metric that writes `column` (from make_metrics), or null.
std::unique_ptr<Metric> registered_metric(const std::string& column);

// FramePlanes of an 8-bit BGR frame at time t_s (the pipeline's own
// prepare_planes: gray, relative luminance).
FramePlanes planes_of(int64_t index, double t_s, const cv::Mat& bgr);

// How each pair is filled in before the metric sees it: the default builds
// it for real (DIS flow both ways, occlusion, warp, camera fit).
using PairFiller = std::function<void(const FramePlanes& prev, const FramePlanes& cur, FramePair&)>;
PairFiller real_pairs(Preset preset = Preset::balanced);

// Runs `metric` over the frames as the pipeline does (measure_first,
// measure_pair, observe_in_order in order, finish) and returns the report
// holding its columns. `before_finish` may add other metrics' series.
Report run_metric(Metric& metric, const std::vector<FramePlanes>& frames,
                  const PairFiller& fill = real_pairs(),
                  const std::function<void(Report&)>& before_finish = {});

}  // namespace clipwarden::testing
