#include "analyzer/metrics/camera_path.h"

#include <cmath>
#include <limits>

namespace clipwarden {

std::array<cv::Point2d, 5> camera_reference_points(cv::Size frame) {
  const double cx = frame.width / 2.0, cy = frame.height / 2.0;
  const double hx = 0.4 * frame.width, hy = 0.4 * frame.height;
  return {cv::Point2d(cx, cy), cv::Point2d(cx - hx, cy - hy), cv::Point2d(cx + hx, cy - hy),
          cv::Point2d(cx - hx, cy + hy), cv::Point2d(cx + hx, cy + hy)};
}

CameraStep camera_step(const cv::Matx33d& h, cv::Size frame, double dt_s, bool valid) {
  CameraStep step;
  step.dt_s = dt_s;
  step.valid = valid && dt_s > 0;
  const auto points = camera_reference_points(frame);
  for (size_t i = 0; i < points.size(); ++i) {
    const cv::Vec3d q = h * cv::Vec3d(points[i].x, points[i].y, 1.0);
    if (!(q[2] > 1e-9) || !std::isfinite(q[0]) || !std::isfinite(q[1])) {
      step.valid = false;
      continue;
    }
    step.displacement_px[i] = cv::Point2d(q[0] / q[2], q[1] / q[2]) - points[i];
  }
  return step;
}

std::vector<double> camera_jerk(const std::vector<CameraStep>& steps, cv::Size frame) {
  const size_t n = steps.size();
  std::vector<double> jerk(n, std::numeric_limits<double>::quiet_NaN());
  const double diagonal = std::hypot(frame.width, frame.height);
  if (diagonal <= 0) return jerk;
  for (size_t t = 1; t + 1 < n; ++t) {
    const CameraStep& a = steps[t];
    const CameraStep& b = steps[t + 1];
    if (!a.valid || !b.valid) continue;
    const double dt = (a.dt_s + b.dt_s) / 2;
    double sum_sq = 0;
    for (size_t i = 0; i < a.displacement_px.size(); ++i) {
      const cv::Point2d accel = (b.displacement_px[i] / b.dt_s - a.displacement_px[i] / a.dt_s) / dt;
      sum_sq += accel.dot(accel);
    }
    jerk[t] = std::sqrt(sum_sq / a.displacement_px.size()) / diagonal;
  }
  return jerk;
}

}  // namespace clipwarden
