#include "analyzer/metrics/picture_acceleration.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include "analyzer/frame/series_math.h"

namespace clipwarden {
namespace {

// Points agree with the picture's median acceleration within 2 px (a sum of
// two flows, each held to the camera fit's 1 px tolerance in
// analyzer/flow/camera_motion.cpp) or a quarter of its length, whichever is
// larger: a 26 px jump (a frame displaced by 13 px) read through motion blur
// keeps its points within 6.5 px.
constexpr float kAgreementPx = 2.0f;
constexpr float kAgreementShareOfLength = 0.25f;
// Four points in five: a displaced frame moves every point, and its jump
// frame read 1.00 on opencv-doc cup.mp4 and testsrc2 with our injector, its
// neighbours 0.90-0.97; a cockatoo at the lens jerking its head, the bird
// most of the view, carried at most 0.56 (corpus, 2026-12-05).
constexpr double kMinAgreeingShare = 0.8;
constexpr size_t kMinPoints = 12;

}  // namespace

double picture_acceleration(const FlowSamples& incoming, const cv::Mat& flow_forward,
                            const cv::Mat& valid_next) {
  constexpr double kUndefinedReading = std::numeric_limits<double>::quiet_NaN();
  if (flow_forward.empty() || valid_next.empty() || incoming.at.size() < kMinPoints) return kUndefinedReading;
  std::vector<cv::Point2f> a;
  a.reserve(incoming.at.size());
  for (size_t i = 0; i < incoming.at.size(); ++i) {
    const cv::Point p = incoming.at[i];
    if (p.y >= flow_forward.rows || p.x >= flow_forward.cols) continue;
    const cv::Vec2f f = flow_forward.at<cv::Vec2f>(p);
    const int lx = static_cast<int>(std::lround(p.x + f[0])), ly = static_cast<int>(std::lround(p.y + f[1]));
    if (lx < 0 || ly < 0 || lx >= valid_next.cols || ly >= valid_next.rows || !valid_next.at<uint8_t>(ly, lx))
      continue;
    a.emplace_back(f[0] + incoming.flow[i].x, f[1] + incoming.flow[i].y);
  }
  if (a.size() < kMinPoints) return kUndefinedReading;
  std::vector<float> xs(a.size()), ys(a.size());
  for (size_t i = 0; i < a.size(); ++i) xs[i] = a[i].x, ys[i] = a[i].y;
  const cv::Point2f m(upper_median_in_place(xs), upper_median_in_place(ys));
  const float length = std::hypot(m.x, m.y);
  const float tolerance = std::max(kAgreementPx, kAgreementShareOfLength * length);
  const auto agreeing = std::count_if(a.begin(), a.end(), [&](const cv::Point2f& v) {
    return std::hypot(v.x - m.x, v.y - m.y) <= tolerance;
  });
  if (static_cast<double>(agreeing) < kMinAgreeingShare * static_cast<double>(a.size())) return kUndefinedReading;
  return length / std::hypot(flow_forward.cols, flow_forward.rows);
}

}  // namespace clipwarden
