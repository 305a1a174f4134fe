// flicker: brightness change that motion does not explain.
// For each pair, d_t = mean over consistent pixels of Y_t - W(Y_{t-1}), the
// change of relative luminance after motion compensation (a moving bright
// object adds nothing; a pulse of the whole picture does). The
// motion-compensated luminance track is L_0 = mean Y_0, L_t = L_{t-1} + d_t.
// flicker_t = |L_t - median(L over a centred 1 s window)|: slow lighting
// changes (a sunset, an exposure ramp) follow the median and score ~0,
// pulses shorter than half a second stand out. Units: relative luminance.
// Also writes `luminance`, the frame's plain mean relative luminance.
#include <cmath>

#include "analyzer/metrics/image_error.h"
#include "analyzer/metrics/metric.h"
#include "analyzer/metrics/series_math.h"

namespace framelint {
namespace {

constexpr double kMedianWindow_s = 1.0;

class FlickerMetric final : public Metric {
 public:
  std::vector<std::string> columns() const override { return {"luminance", "flicker"}; }

  void measure_first(const FramePlanes& frame, std::span<double> out) const override {
    out[0] = cv::mean(frame.luminance)[0];
  }

  void measure_pair(const FramePair& pair, std::span<double> out) const override {
    out[0] = cv::mean(pair.cur->luminance)[0];
    // Raw step d_t; finish() turns the steps into the high-passed track.
    out[1] = masked_mean_difference(pair.cur->luminance, pair.warped_prev_luminance, pair.valid);
  }

  void finish(Report& report) override {
    MetricSeries* luminance = report.find_series("luminance");
    MetricSeries* flicker = report.find_series("flicker");
    if (!luminance || !flicker || flicker->values.empty()) return;
    std::vector<double>& v = flicker->values;
    const size_t n = v.size();
    std::vector<double> track(n);
    track[0] = luminance->values[0];
    for (size_t t = 1; t < n; ++t) {
      // No consistent pixel at all (e.g. a cut): fall back to the plain change.
      const double step = std::isnan(v[t]) ? luminance->values[t] - luminance->values[t - 1] : v[t];
      track[t] = track[t - 1] + step;
    }
    const double dt = median_frame_interval_s(report.frame_times_s);
    const int half = std::max(2, dt > 0 ? static_cast<int>(std::lround(kMedianWindow_s / 2 / dt)) : 2);
    const std::vector<double> median = running_median(track, half);
    for (size_t t = 0; t < n; ++t) v[t] = std::fabs(track[t] - median[t]);
  }
};

}  // namespace

std::unique_ptr<Metric> make_flicker_metric(const AnalysisSettings&) {
  return std::make_unique<FlickerMetric>();
}

}  // namespace framelint
