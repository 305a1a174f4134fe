// warp_error: the warping error of Lai et al., "Learning Blind Video
// Temporal Consistency", ECCV 2018, eq. (8): over the non-occluded pixels M,
//   E = 1/|M| * sum_{x in M} || V_t(x) - W(V_{t-1})(x) ||_2^2
// with RGB in [0,1], so a pixel contributes the squared difference summed
// over its three channels. occluded_pct is 100 * |not M| / |all pixels|.
#include "analyzer/metrics/image_error.h"
#include "analyzer/metrics/metric.h"
#include "analyzer/frame/shot_boundaries.h"

namespace clipwarden {
namespace {

class WarpErrorMetric final : public Metric {
 public:
  std::vector<std::string> columns() const override { return {"warp_error", "occluded_pct"}; }

  void measure_pair(const FramePair& pair, std::span<double> out) const override {
    out[0] = masked_squared_rgb_error(pair.cur->bgr, pair.warped_prev_bgr, pair.valid);
    out[1] = 100.0 * (1.0 - pair.valid_fraction);
  }

  // Across a cut there is no motion to compensate: `cut` reports that frame.
  void finish(Report& report) override {
    if (MetricSeries* s = report.find_series("warp_error")) clear_across_boundaries(s->values, shot_boundaries(report));
  }
};

}  // namespace

std::unique_ptr<Metric> make_warp_error_metric(const AnalysisSettings&) {
  return std::make_unique<WarpErrorMetric>();
}

}  // namespace clipwarden
