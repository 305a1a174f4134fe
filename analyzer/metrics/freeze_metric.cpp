// freeze: 1 when frame t repeats frame t-1, else 0. "Repeats" means the
// mean absolute difference of the two grey frames is at most 0.001 of the
// full range (-60 dB), the same noise floor FFmpeg's freezedetect filter
// uses by default (its `noise` option, -60 dB) [recalled from FFmpeg's
// filter documentation]. The freeze test checks agreement with freezedetect.
#include "analyzer/metrics/image_error.h"
#include "analyzer/metrics/metric.h"

namespace clipwarden {
namespace {

constexpr double kRepeatMaxMeanDifference = 0.001;

class FreezeMetric final : public Metric {
 public:
  std::vector<std::string> columns() const override { return {"freeze"}; }
  void measure_pair(const FramePair& pair, std::span<double> out) const override {
    out[0] = mean_absolute_difference(pair.cur->gray, pair.prev->gray) <= kRepeatMaxMeanDifference ? 1.0 : 0.0;
  }
};

}  // namespace

std::unique_ptr<Metric> make_freeze_metric(const AnalysisSettings&) { return std::make_unique<FreezeMetric>(); }

}  // namespace clipwarden
