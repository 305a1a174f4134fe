#include "analyzer/inspect/panels.h"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include <opencv2/imgproc.hpp>

#include "analyzer/inspect/flow_colour.h"

namespace clipwarden {
namespace {

// The heat map's colour scale: OpenCV's "inferno" map, dark for no error and
// bright for large error, readable in grey print and by most colour-blind
// readers.
cv::Mat apply_heat_scale(const cv::Mat& unit_values /* CV_32FC1 in [0,1] */) {
  cv::Mat bytes;
  unit_values.convertTo(bytes, CV_8U, 255.0);
  cv::Mat out;
  cv::applyColorMap(bytes, out, cv::COLORMAP_INFERNO);
  return out;
}

// Light/dark grey diagonal stripes: "no data here".
cv::Vec3b hatch_colour(int x, int y) {
  return ((x + y) / 3) % 2 ? cv::Vec3b(150, 150, 150) : cv::Vec3b(200, 200, 200);
}

}  // namespace

cv::Mat warp_error_map(const cv::Mat& current_bgr, const cv::Mat& warped_previous_bgr) {
  CV_Assert(current_bgr.type() == CV_8UC3 && warped_previous_bgr.type() == CV_8UC3 &&
            current_bgr.size() == warped_previous_bgr.size());
  cv::Mat a, b, diff;
  current_bgr.convertTo(a, CV_32FC3, 1.0 / 255.0);
  warped_previous_bgr.convertTo(b, CV_32FC3, 1.0 / 255.0);
  cv::subtract(a, b, diff);
  cv::multiply(diff, diff, diff);
  cv::Mat error(current_bgr.size(), CV_32FC1);
  cv::transform(diff, error, cv::Matx13f(1.f, 1.f, 1.f));  // sum over the channels
  return error;
}

cv::Mat warp_error_heat_image(const cv::Mat& error_map, const cv::Mat& valid) {
  cv::Mat unit;
  error_map.convertTo(unit, CV_32F, 1.0 / kWarpErrorHeatMax);
  cv::min(unit, 1.0, unit);
  cv::max(unit, 0.0, unit);
  cv::sqrt(unit, unit);  // colour position = RGB distance / sqrt(max): small errors stay visible
  cv::Mat heat = apply_heat_scale(unit);
  if (!valid.empty()) {
    for (int y = 0; y < heat.rows; ++y) {
      const auto* v = valid.ptr<uint8_t>(y);
      auto* px = heat.ptr<cv::Vec3b>(y);
      for (int x = 0; x < heat.cols; ++x)
        if (!v[x]) px[x] = hatch_colour(x, y);
    }
  }
  return heat;
}

FramePanels make_pair_panels(const FramePair& pair) {
  CV_Assert(pair.prev && pair.cur);
  FramePanels p;
  p.frame_index = pair.cur->index;
  p.t_s = pair.cur->t_s;
  p.has_previous = true;
  p.current = pair.cur->bgr.clone();
  p.previous = pair.prev->bgr.clone();
  p.warped_previous = pair.warped_prev_bgr.clone();
  const cv::Mat error = warp_error_map(p.current, p.warped_previous);
  p.warp_error_heat = warp_error_heat_image(error, pair.valid);
  // flow_backward points from a current pixel to where it came from; its
  // negation is the motion previous -> current at that pixel, which is what
  // a reader expects the colours to say.
  const cv::Mat motion = pair.flow_backward * -1.0;
  p.flow_colour = flow_to_bgr(motion, 0, &p.max_flow_px);
  if (pair.valid.empty()) {
    p.occlusion_mask = cv::Mat::zeros(p.current.size(), CV_8UC1);
  } else {
    cv::bitwise_not(pair.valid, p.occlusion_mask);
  }
  const int valid_count =
      pair.valid.empty() ? error.rows * error.cols : cv::countNonZero(pair.valid);
  const int total = std::max(1, error.rows * error.cols);
  p.occluded_pct = 100.0 * (total - valid_count) / total;
  p.mean_warp_error =
      valid_count > 0 ? (pair.valid.empty() ? cv::mean(error)[0] : cv::mean(error, pair.valid)[0])
                      : 0.0;
  return p;
}

FramePanels make_first_frame_panels(const FramePlanes& frame) {
  FramePanels p;
  p.frame_index = frame.index;
  p.t_s = frame.t_s;
  p.current = frame.bgr.clone();
  return p;
}

cv::Mat warp_error_colour_bar(int width_px, int height_px, bool with_labels) {
  const int bar_h = with_labels ? std::max(8, height_px - 34) : height_px;
  cv::Mat ramp(1, width_px, CV_32FC1);
  for (int x = 0; x < width_px; ++x)
    ramp.at<float>(0, x) = float(x) / float(std::max(1, width_px - 1));
  cv::Mat bar_row = apply_heat_scale(ramp);
  cv::Mat out(height_px, width_px, CV_8UC3, cv::Scalar(255, 255, 255));
  cv::resize(bar_row, out.rowRange(0, bar_h), cv::Size(width_px, bar_h), 0, 0, cv::INTER_NEAREST);
  if (!with_labels) return out;
  const cv::Scalar ink(40, 40, 40);
  const double scale = 0.4;
  const int margin = 4;
  // Ticks at colour positions 0, 0.2, ..., 1: squared errors max * p^2.
  for (const double position : warp_error_tick_positions()) {
    char label[32];
    std::snprintf(label, sizeof label, position >= 1 ? ">=%g" : "%g",
                  warp_error_at_position(position));
    int baseline = 0;
    const int w = cv::getTextSize(label, cv::FONT_HERSHEY_SIMPLEX, scale, 1, &baseline).width;
    const int x = static_cast<int>(std::lround(position * (width_px - 1)));
    cv::line(out, {x, bar_h - 4}, {x, bar_h + 2}, ink);
    const int text_x = std::clamp(x - w / 2, margin, width_px - w - margin);
    cv::putText(out, label, {text_x, bar_h + 14}, cv::FONT_HERSHEY_SIMPLEX, scale, ink, 1,
                cv::LINE_AA);
  }
  cv::putText(out, "warp error per pixel: squared RGB difference (sum over R,G,B in 0-1)",
              {margin, bar_h + 30}, cv::FONT_HERSHEY_SIMPLEX, scale, ink, 1, cv::LINE_AA);
  return out;
}

std::vector<double> warp_error_tick_positions() { return {0, 0.2, 0.4, 0.6, 0.8, 1.0}; }

double warp_error_at_position(double position) { return kWarpErrorHeatMax * position * position; }

cv::Mat flow_colour_key(int size_px) { return flow_colour_wheel_image(size_px); }

}  // namespace clipwarden
