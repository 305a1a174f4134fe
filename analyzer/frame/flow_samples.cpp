#include "analyzer/frame/flow_samples.h"

#include <algorithm>
#include <cmath>

namespace clipwarden {

FlowSamples sample_flow_grid(const cv::Mat& flow, const cv::Mat& valid) {
  FlowSamples out;
  if (flow.empty() || valid.size() != flow.size()) return out;
  const int step = std::max(4, static_cast<int>(std::sqrt(flow.total() / 600.0)));
  const size_t capacity = flow.total() / (static_cast<size_t>(step) * step) + 1;
  out.at.reserve(capacity);
  out.flow.reserve(capacity);
  for (int y = step / 2; y < flow.rows; y += step) {
    const cv::Vec2f* f = flow.ptr<cv::Vec2f>(y);
    const uint8_t* v = valid.ptr<uint8_t>(y);
    for (int x = step / 2; x < flow.cols; x += step) {
      if (!v[x]) continue;
      out.at.emplace_back(x, y);
      out.flow.emplace_back(f[x][0], f[x][1]);
    }
  }
  return out;
}

}  // namespace clipwarden
