// cut: a hard discontinuity between frames t-1 and t (a jump to another
// scene or subject). Two signs must agree: optical flow cannot explain the
// new frame (a low share of pixels passes the forward-backward check), and
// the picture's colour distribution changes (Bhattacharyya distance of
// 8x8x8 BGR histograms, a common practice in shot-boundary detection).
//   cut = sqrt((1 - valid_fraction) * bhattacharyya)   in [0, 1]
// Fast motion alone lowers the valid share but keeps the colours; a
// lighting change shifts colours but flow stays consistent.
#include <cmath>

#include <opencv2/imgproc.hpp>

#include "analyzer/metrics/metric.h"

namespace framelint {
namespace {

cv::Mat colour_histogram(const cv::Mat& bgr) {
  static const int channels[] = {0, 1, 2};
  static const int bins[] = {8, 8, 8};
  static const float range[] = {0, 256};
  static const float* ranges[] = {range, range, range};
  cv::Mat hist;
  cv::calcHist(&bgr, 1, channels, cv::noArray(), hist, 3, bins, ranges);
  return hist;
}

class CutMetric final : public Metric {
 public:
  std::vector<std::string> columns() const override { return {"cut"}; }
  void measure_pair(const FramePair& pair, std::span<double> out) const override {
    const double distance = cv::compareHist(colour_histogram(pair.prev->bgr), colour_histogram(pair.cur->bgr),
                                            cv::HISTCMP_BHATTACHARYYA);
    out[0] = std::sqrt(std::clamp(1.0 - pair.valid_fraction, 0.0, 1.0) * std::clamp(distance, 0.0, 1.0));
  }
};

}  // namespace

std::unique_ptr<Metric> make_cut_metric(const AnalysisSettings&) { return std::make_unique<CutMetric>(); }

}  // namespace framelint
