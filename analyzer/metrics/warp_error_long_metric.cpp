// warp_error_long: the warping error between frame t and frame t-k, with the
// backward flows of the k pairs in between chained (x -> x + b_t(x) -> ...),
// and a pixel kept only if it passes the forward-backward check at every
// step. It catches slow changes that each single-frame step hides (textures
// that crawl, colours that creep). Same units as warp_error.
#include <deque>

#include <opencv2/imgproc.hpp>

#include "analyzer/metrics/image_error.h"
#include "analyzer/metrics/metric.h"
#include "analyzer/metrics/shot_boundaries.h"

namespace framelint {
namespace {

class WarpErrorLongMetric final : public Metric {
 public:
  explicit WarpErrorLongMetric(int k) : k_(std::max(2, k)) {}

  std::vector<std::string> columns() const override { return {"warp_error_long"}; }
  bool needs_in_order() const override { return true; }
  void measure_first(const FramePlanes& frame, std::span<double>) const override { (void)frame; }
  void measure_pair(const FramePair&, std::span<double>) const override {}

  void observe_in_order(const FramePair& pair, std::span<double> out) override {
    if (frames_.empty()) frames_.push_back(pair.prev->bgr.clone());
    steps_.push_back({pair.flow_backward.clone(), pair.valid.clone()});
    frames_.push_back(pair.cur->bgr.clone());
    if (static_cast<int>(steps_.size()) > k_) steps_.pop_front();
    if (static_cast<int>(frames_.size()) > k_ + 1) frames_.pop_front();
    if (static_cast<int>(steps_.size()) < k_) return;  // stays undefined

    // Walk back from frame t: steps_.back() is the pair (t-1, t).
    const Step& last = steps_.back();
    map_.create(last.flow.size(), CV_32FC2);
    for (int y = 0; y < map_.rows; ++y) {
      const cv::Vec2f* b = last.flow.ptr<cv::Vec2f>(y);
      cv::Vec2f* m = map_.ptr<cv::Vec2f>(y);
      for (int x = 0; x < map_.cols; ++x) m[x] = cv::Vec2f(x + b[x][0], y + b[x][1]);
    }
    last.valid.copyTo(chained_valid_);
    for (int j = k_ - 2; j >= 0; --j) {
      const Step& step = steps_[j];
      cv::remap(step.flow, sampled_flow_, map_, cv::noArray(), cv::INTER_LINEAR, cv::BORDER_REPLICATE);
      cv::remap(step.valid, sampled_valid_, map_, cv::noArray(), cv::INTER_NEAREST, cv::BORDER_CONSTANT, 0);
      const int w = map_.cols, h = map_.rows;
      for (int y = 0; y < h; ++y) {
        cv::Vec2f* m = map_.ptr<cv::Vec2f>(y);
        const cv::Vec2f* f = sampled_flow_.ptr<cv::Vec2f>(y);
        const uint8_t* sv = sampled_valid_.ptr<uint8_t>(y);
        uint8_t* cv = chained_valid_.ptr<uint8_t>(y);
        for (int x = 0; x < w; ++x) {
          m[x] += f[x];
          const bool inside = m[x][0] >= 0 && m[x][1] >= 0 && m[x][0] <= w - 1 && m[x][1] <= h - 1;
          cv[x] = (cv[x] && sv[x] && inside) ? 255 : 0;
        }
      }
    }
    cv::remap(frames_.front(), warped_, map_, cv::noArray(), cv::INTER_LINEAR, cv::BORDER_REPLICATE);
    out[0] = masked_squared_rgb_error(pair.cur->bgr, warped_, chained_valid_);
  }

  // A chain that crosses a cut compares two shots: undefined for the k
  // frames after each cut.
  void finish(Report& report) override {
    if (MetricSeries* s = report.find_series("warp_error_long"))
      clear_across_boundaries(s->values, shot_boundaries(report), k_);
  }

 private:
  struct Step {
    cv::Mat flow;   // backward flow of one pair, in the later frame's coordinates
    cv::Mat valid;  // its forward-backward mask
  };
  int k_;
  std::deque<Step> steps_;
  std::deque<cv::Mat> frames_;
  cv::Mat map_, chained_valid_, sampled_flow_, sampled_valid_, warped_;
};

}  // namespace

std::unique_ptr<Metric> make_warp_error_long_metric(const AnalysisSettings& settings) {
  return std::make_unique<WarpErrorLongMetric>(settings.long_range_k);
}

}  // namespace framelint
