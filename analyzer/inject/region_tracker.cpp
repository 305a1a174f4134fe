#include "analyzer/inject/region_tracker.h"
#include "analyzer/frame/series_math.h"

#include <algorithm>
#include <vector>

#include <opencv2/imgproc.hpp>

namespace clipwarden::inject {
namespace {

double median_of(std::vector<float>& v) { return v.empty() ? 0 : upper_median_in_place(v); }

cv::Mat small_gray(const cv::Mat& bgr, double scale) {
  cv::Mat gray, small;
  cv::cvtColor(bgr, gray, cv::COLOR_BGR2GRAY);
  if (scale >= 1) return gray;
  cv::resize(gray, small, cv::Size(), scale, scale, cv::INTER_AREA);
  return small;
}

}  // namespace

void MotionField::set_pair(const cv::Mat& prev_bgr, const cv::Mat& cur_bgr) {
  prev_ = prev_bgr;
  cur_ = cur_bgr;
  computed_ = false;
  scale_ = std::min(1.0, static_cast<double>(kFlowLongSide) / std::max(cur_bgr.cols, cur_bgr.rows));
}

void MotionField::compute() {
  if (computed_ || prev_.empty()) return;
  if (!dis_) dis_ = cv::DISOpticalFlow::create(cv::DISOpticalFlow::PRESET_MEDIUM);
  dis_->calc(small_gray(prev_, scale_), small_gray(cur_, scale_), flow_);
  computed_ = true;
}

cv::Point2d MotionField::median_motion(const cv::Rect2d& box) {
  compute();
  if (flow_.empty()) return {0, 0};
  const cv::Rect2d inner(box.x + 0.2 * box.width, box.y + 0.2 * box.height, 0.6 * box.width, 0.6 * box.height);
  const cv::Rect area = cv::Rect(cv::Rect2d(inner.x * scale_, inner.y * scale_, inner.width * scale_,
                                            inner.height * scale_)) &
                        cv::Rect(0, 0, flow_.cols, flow_.rows);
  if (area.empty()) return {0, 0};
  std::vector<float> dx, dy;
  for (int y = area.y; y < area.y + area.height; ++y)
    for (int x = area.x; x < area.x + area.width; ++x) {
      const cv::Vec2f f = flow_.at<cv::Vec2f>(y, x);
      dx.push_back(f[0]);
      dy.push_back(f[1]);
    }
  return {median_of(dx) / scale_, median_of(dy) / scale_};
}

cv::Mat MotionField::residual_motion() {
  compute();
  if (flow_.empty()) return {};
  std::vector<cv::Mat> xy;
  cv::split(flow_, xy);
  std::vector<float> dx(xy[0].begin<float>(), xy[0].end<float>()), dy(xy[1].begin<float>(), xy[1].end<float>());
  const float mx = static_cast<float>(median_of(dx)), my = static_cast<float>(median_of(dy));
  cv::Mat magnitude;
  cv::magnitude(xy[0] - mx, xy[1] - my, magnitude);
  return magnitude;
}

cv::Rect2d choose_region(const cv::Mat& bgr, MotionField& motion, cv::Size2d box_size, bool prefer_motion,
                         cv::RNG& rng) {
  constexpr int kGrid = 5;
  std::vector<cv::Rect2d> candidates;
  for (int gy = 0; gy < kGrid; ++gy)
    for (int gx = 0; gx < kGrid; ++gx)
      candidates.emplace_back((bgr.cols - box_size.width) * gx / (kGrid - 1),
                              (bgr.rows - box_size.height) * gy / (kGrid - 1), box_size.width, box_size.height);
  if (!prefer_motion) return candidates[static_cast<size_t>(rng.uniform(0, static_cast<int>(candidates.size())))];

  // Texture (mean gradient magnitude) and residual motion per candidate.
  const double scale = std::min(1.0, static_cast<double>(MotionField::kFlowLongSide) / std::max(bgr.cols, bgr.rows));
  const cv::Mat gray = small_gray(bgr, scale);
  cv::Mat gx, gy, gradient;
  cv::Sobel(gray, gx, CV_32F, 1, 0);
  cv::Sobel(gray, gy, CV_32F, 0, 1);
  cv::magnitude(gx, gy, gradient);
  const cv::Mat residual = motion.residual_motion();
  double best = -1;
  cv::Rect2d chosen = candidates[candidates.size() / 2];
  for (const auto& c : candidates) {
    const cv::Rect r = cv::Rect(cv::Rect2d(c.x * scale, c.y * scale, c.width * scale, c.height * scale)) &
                       cv::Rect(0, 0, gray.cols, gray.rows);
    if (r.empty()) continue;
    const double texture = cv::mean(gradient(r))[0];
    const double moving = residual.empty() ? 0 : cv::mean(residual(r))[0];
    // A small seeded jitter breaks exact ties reproducibly.
    const double score = texture * (1.0 + 4.0 * moving) * (1.0 + 0.01 * rng.uniform(0.0, 1.0));
    if (score > best) {
      best = score;
      chosen = c;
    }
  }
  return chosen;
}

}  // namespace clipwarden::inject
