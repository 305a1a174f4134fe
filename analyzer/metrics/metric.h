// The one interface every metric implements. A metric's descriptor (beside
// its code, metric_descriptor.h) says which per-frame columns it writes and
// what they mean; the metric measures a frame pair (possibly concurrently with other
// pairs), may carry state across frames in order, and finishes its series
// into the report once the clip ends. Metrics are listed in registry.cpp.
//
// Order of a clip's analysis (analyzer/pipeline):
//   1. decode -> FramePlanes per frame; measure_first(frame 0);
//   2. per pair (t-1, t): flow both ways, occlusion mask, warp -> FramePair;
//      measure_pair() for every metric (pairs run concurrently);
//   3. in frame order: observe_in_order() for metrics with needs_in_order();
//   4. after the last frame: finish(report) for every metric, in registry
//      order: post-process its own series, add summary.details[metric],
//      objects, or segments that are not a plain threshold on a series;
//   5. the segmenter turns every series that has a SegmentRule in the policy
//      into segments; summary statistics; coherence; policy verdict.
#pragma once

#include <memory>
#include <span>
#include <string>
#include <vector>

#include "analyzer/frame/frame_pair.h"
#include "analyzer/metrics/metric_descriptor.h"
#include "clipwarden/analysis.h"
#include "clipwarden/report.h"

namespace clipwarden {

class Metric {
 public:
  virtual ~Metric() = default;

  // The metric's descriptor, the same object registry.cpp lists.
  virtual const MetricDescriptor& descriptor() const = 0;

  // Per-frame columns this metric writes into report.frames, in order: the
  // descriptor's columns.
  std::vector<std::string> columns() const {
    std::vector<std::string> names;
    for (const auto& c : descriptor().columns) names.push_back(c.name);
    return names;
  }

  // Called for frame 0 (no previous frame); `out` has one slot per column,
  // pre-filled with kUndefined.
  virtual void measure_first(const FramePlanes& /*frame*/, std::span<double> /*out*/) const {}

  // Called for each pair (t-1, t). May run on several threads at once for
  // different pairs: must not change the metric's state.
  virtual void measure_pair(const FramePair& pair, std::span<double> out) const = 0;

  // Called for every pair in frame order on one thread after measure_pair,
  // with its values, for metrics that follow something across frames
  // (objects, camera path). May rewrite `out`.
  virtual void observe_in_order(const FramePair& /*pair*/, std::span<double> /*out*/) {}

  // Called once after the last frame with the report's series filled in:
  // post-process series (e.g. high-pass), add summary.details, objects.
  virtual void finish(Report& /*report*/) {}

  // True if observe_in_order needs the flow fields and planes kept alive in
  // order (costs memory and a serial stage).
  virtual bool needs_in_order() const { return false; }
};

// A fresh set of metric instances for one clip, in registry order.
std::vector<std::unique_ptr<Metric>> make_metrics(const AnalysisSettings& settings);

}  // namespace clipwarden
