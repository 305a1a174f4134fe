#include "analyzer/flow/occlusion.h"

namespace clipwarden {

void flow_to_map(const cv::Mat& flow, cv::Mat& map) {
  CV_Assert(flow.type() == CV_32FC2);
  map.create(flow.size(), CV_32FC2);
  for (int y = 0; y < flow.rows; ++y) {
    const cv::Vec2f* f = flow.ptr<cv::Vec2f>(y);
    cv::Vec2f* m = map.ptr<cv::Vec2f>(y);
    for (int x = 0; x < flow.cols; ++x) m[x] = cv::Vec2f(x + f[x][0], y + f[x][1]);
  }
}

double forward_backward_check(const cv::Mat& flow_backward, const cv::Mat& forward_at_target,
                              cv::Mat& valid) {
  CV_Assert(flow_backward.type() == CV_32FC2 && forward_at_target.type() == CV_32FC2);
  valid.create(flow_backward.size(), CV_8UC1);
  const int w = flow_backward.cols, h = flow_backward.rows;
  size_t count = 0;
  for (int y = 0; y < h; ++y) {
    const cv::Vec2f* b = flow_backward.ptr<cv::Vec2f>(y);
    const cv::Vec2f* f = forward_at_target.ptr<cv::Vec2f>(y);
    uint8_t* v = valid.ptr<uint8_t>(y);
    for (int x = 0; x < w; ++x) {
      const float tx = x + b[x][0], ty = y + b[x][1];
      const bool inside = tx >= 0 && ty >= 0 && tx <= w - 1 && ty <= h - 1;
      const float sx = b[x][0] + f[x][0], sy = b[x][1] + f[x][1];
      const float lhs = sx * sx + sy * sy;
      const float rhs = kOcclusionRelative * (b[x][0] * b[x][0] + b[x][1] * b[x][1] +
                                              f[x][0] * f[x][0] + f[x][1] * f[x][1]) +
                        kOcclusionAbsolute;
      const bool ok = inside && lhs < rhs;
      v[x] = ok ? 255 : 0;
      count += ok;
    }
  }
  return static_cast<double>(count) / (static_cast<double>(w) * h);
}

}  // namespace clipwarden
