// drift: objects followed through the clip and compared with their own
// first look (analyzer/drift, docs/drift.md). Per frame: the worst object's
// combined drift and its colour (CIEDE2000), structure and size components;
// per object: report.objects.
//
// Setting CLIPWARDEN_DISABLE_DRIFT=1 in the environment turns the follower
// off (columns stay, values null); it exists to measure drift's share of the
// analysis time.
#include <cmath>
#include <cstdlib>
#include <memory>
#include <string>

#include "analyzer/drift/drift_report.h"
#include "analyzer/drift/drift_tracker.h"
#include "analyzer/metrics/metric.h"
#include "clipwarden/policy.h"

namespace clipwarden {
namespace {

bool drift_disabled_by_environment() {
  const char* v = std::getenv("CLIPWARDEN_DISABLE_DRIFT");
  return v && *v && std::string(v) != "0";
}

// Per-object drift stretches use the default policy's rule for `drift` when
// it has one, so objects and clip segments agree.
drift::ObjectSegmentRule object_segment_rule() {
  drift::ObjectSegmentRule rule;
  const auto& segments = default_policy().segments;
  if (auto it = segments.find("drift"); it != segments.end() && it->second.enter > 0) {
    rule.enter = it->second.enter;
    rule.leave = it->second.leave;
    rule.min_frames = it->second.min_frames;
    rule.merge_gap_frames = it->second.merge_gap_frames;
  }
  return rule;
}

class DriftMetric final : public Metric {
 public:
  explicit DriftMetric(const AnalysisSettings& settings)
      : tracker_(settings.max_objects), enabled_(!drift_disabled_by_environment()) {}

  std::vector<std::string> columns() const override {
    return {"drift", "drift_color_de00", "drift_structure", "drift_size_pct"};
  }

  // The per-frame feature planes are computed here, concurrently, ahead of
  // the serial tracker (they depend on the frame's pixels only).
  void measure_pair(const FramePair& pair, std::span<double> /*out*/) const override {
    if (enabled_) tracker_.prepare(pair);
  }

  bool needs_in_order() const override { return enabled_; }

  void observe_in_order(const FramePair& pair, std::span<double> out) override {
    if (!enabled_ || out.size() < 4) return;
    if (pair.cur) {
      frame_width_ = pair.cur->bgr.cols;
      frame_height_ = pair.cur->bgr.rows;
    }
    const drift::FrameDrift d = tracker_.step(pair);
    out[0] = d.drift;
    out[1] = d.color_de00;
    out[2] = d.structure;
    out[3] = d.size_pct;
  }

  void finish(Report& report) override {
    if (!enabled_) return;
    tracker_.finish();
    const drift::ObjectSegmentRule rule = object_segment_rule();
    for (const auto& object : tracker_.objects()) {
      report.objects.push_back(drift::to_tracked_object(object, frame_width_, frame_height_, rule));
      mark_reference_frame(report, object.first_frame);
    }
    report.summary.details["drift"] = drift::drift_summary(tracker_.objects());
  }

 private:
  // An object's first frame is its own reference: drift 0 there, unless
  // another object already measured something in that frame.
  static void mark_reference_frame(Report& report, int64_t frame) {
    for (const char* column : {"drift", "drift_color_de00", "drift_structure", "drift_size_pct"}) {
      MetricSeries* series = report.find_series(column);
      if (!series || frame < 0 || frame >= static_cast<int64_t>(series->values.size())) continue;
      double& v = series->values[static_cast<size_t>(frame)];
      if (!is_defined(v)) v = 0;
    }
  }

  drift::DriftTracker tracker_;
  bool enabled_;
  int frame_width_ = 0, frame_height_ = 0;
};

}  // namespace

std::unique_ptr<Metric> make_drift_metric(const AnalysisSettings& settings) {
  return std::make_unique<DriftMetric>(settings);
}

}  // namespace clipwarden
