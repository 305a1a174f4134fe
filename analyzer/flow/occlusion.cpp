#include "analyzer/flow/occlusion.h"

namespace clipwarden {

void flow_to_map(const cv::Mat& flow, cv::Mat& map, int first_row) {
  CV_Assert(flow.type() == CV_32FC2);
  map.create(flow.size(), CV_32FC2);
  for (int row = 0; row < flow.rows; ++row) {
    const int y = first_row + row;
    const cv::Vec2f* f = flow.ptr<cv::Vec2f>(row);
    cv::Vec2f* m = map.ptr<cv::Vec2f>(row);
    for (int x = 0; x < flow.cols; ++x) m[x] = cv::Vec2f(x + f[x][0], y + f[x][1]);
  }
}

double forward_backward_check(const cv::Mat& flow_backward, const cv::Mat& forward_at_target,
                              cv::Mat& valid) {
  CV_Assert(forward_at_target.size() == flow_backward.size());
  valid.create(flow_backward.size(), CV_8UC1);
  const size_t count = forward_backward_rows(flow_backward, forward_at_target, 0, valid);
  return static_cast<double>(count) /
         (static_cast<double>(flow_backward.cols) * flow_backward.rows);
}

size_t forward_backward_rows(const cv::Mat& flow_backward, const cv::Mat& forward_at_target,
                             int first_row, cv::Mat& valid) {
  CV_Assert(flow_backward.type() == CV_32FC2 && forward_at_target.type() == CV_32FC2);
  CV_Assert(valid.type() == CV_8UC1 && valid.size() == flow_backward.size());
  CV_Assert(forward_at_target.cols == flow_backward.cols && first_row >= 0 &&
            first_row + forward_at_target.rows <= flow_backward.rows);
  const int w = flow_backward.cols, h = flow_backward.rows;
  size_t count = 0;
  for (int row = 0; row < forward_at_target.rows; ++row) {
    const int y = first_row + row;
    const cv::Vec2f* b = flow_backward.ptr<cv::Vec2f>(y);
    const cv::Vec2f* f = forward_at_target.ptr<cv::Vec2f>(row);
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
  return count;
}

}  // namespace clipwarden
