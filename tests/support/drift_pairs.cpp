#include "support/drift_pairs.h"

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <filesystem>

#include <opencv2/calib3d.hpp>
#include <opencv2/imgproc.hpp>
#include <opencv2/video/tracking.hpp>

#include "analyzer/color/color_space.h"

namespace framelint::test {

FramePlanes make_planes(int64_t index, double t_s, const cv::Mat& bgr) {
  FramePlanes planes;
  planes.index = index;
  planes.t_s = t_s;
  planes.bgr = bgr;
  cv::cvtColor(bgr, planes.gray, cv::COLOR_BGR2GRAY);
  planes.luminance.create(bgr.size(), CV_32F);
  for (int y = 0; y < bgr.rows; ++y) {
    for (int x = 0; x < bgr.cols; ++x) {
      const cv::Vec3b c = bgr.at<cv::Vec3b>(y, x);
      const auto lin = color::srgb_to_linear(color::Rgb{c[2] / 255.0, c[1] / 255.0, c[0] / 255.0});
      planes.luminance.at<float>(y, x) =
          static_cast<float>(0.2126 * lin.r + 0.7152 * lin.g + 0.0722 * lin.b);
    }
  }
  return planes;
}

struct TestPairBuilder::Impl {
  cv::Ptr<cv::DISOpticalFlow> dis = cv::DISOpticalFlow::create(cv::DISOpticalFlow::PRESET_FAST);
};

TestPairBuilder::TestPairBuilder() : impl_(std::make_unique<Impl>()) {}
TestPairBuilder::~TestPairBuilder() = default;

void TestPairBuilder::build(const FramePlanes& prev, const FramePlanes& cur, FramePair& pair) {
  pair.prev = &prev;
  pair.cur = &cur;
  pair.dt_s = cur.t_s - prev.t_s;
  impl_->dis->calc(prev.gray, cur.gray, pair.flow_forward);
  impl_->dis->calc(cur.gray, prev.gray, pair.flow_backward);
  // Occlusion in cur's coordinates: x -> prev at x + b(x), back by f.
  pair.valid.create(cur.gray.size(), CV_8U);
  int valid = 0;
  for (int y = 0; y < cur.gray.rows; ++y) {
    for (int x = 0; x < cur.gray.cols; ++x) {
      const cv::Vec2f b = pair.flow_backward.at<cv::Vec2f>(y, x);
      const int px = cvRound(x + b[0]), py = cvRound(y + b[1]);
      bool ok = false;
      if (px >= 0 && py >= 0 && px < cur.gray.cols && py < cur.gray.rows) {
        const cv::Vec2f f = pair.flow_forward.at<cv::Vec2f>(py, px);
        const cv::Vec2f s = b + f;
        ok = s.dot(s) < 0.01f * (b.dot(b) + f.dot(f)) + 0.5f;
      }
      pair.valid.at<uint8_t>(y, x) = ok ? 255 : 0;
      valid += ok;
    }
  }
  pair.valid_fraction = static_cast<double>(valid) / (cur.gray.rows * cur.gray.cols);
  // Camera homography prev -> cur from forward flow on a grid of valid points.
  std::vector<cv::Point2f> from, to;
  for (int y = 4; y < prev.gray.rows; y += 8) {
    for (int x = 4; x < prev.gray.cols; x += 8) {
      const cv::Vec2f f = pair.flow_forward.at<cv::Vec2f>(y, x);
      const int cx = cvRound(x + f[0]), cy = cvRound(y + f[1]);
      if (cx < 0 || cy < 0 || cx >= cur.gray.cols || cy >= cur.gray.rows) continue;
      if (!pair.valid.at<uint8_t>(cy, cx)) continue;
      from.emplace_back(static_cast<float>(x), static_cast<float>(y));
      to.emplace_back(x + f[0], y + f[1]);
    }
  }
  pair.camera_homography = cv::Matx33d::eye();
  pair.camera_inlier_fraction = 0;
  if (from.size() >= 8) {
    cv::Mat inliers;
    cv::Mat h = cv::findHomography(from, to, cv::RANSAC, 1.0, inliers, 500, 0.995);
    if (!h.empty()) {
      pair.camera_homography = cv::Matx33d(h);
      pair.camera_inlier_fraction = cv::countNonZero(inliers) / static_cast<double>(from.size());
    }
  }
}

Report run_metric_on_frames(Metric& metric, const std::vector<cv::Mat>& frames, double fps) {
  double pair_seconds_ = 0, metric_seconds_ = 0;
  Report report;
  const auto columns = metric.columns();
  for (const auto& c : columns) report.series.push_back({c, std::vector<double>(frames.size(), kUndefined)});
  std::vector<double> row(columns.size());
  TestPairBuilder builder;
  FramePlanes prev, cur;
  FramePair pair;
  for (size_t i = 0; i < frames.size(); ++i) {
    report.frame_times_s.push_back(static_cast<double>(i) / fps);
    cur = make_planes(static_cast<int64_t>(i), static_cast<double>(i) / fps, frames[i]);
    std::fill(row.begin(), row.end(), kUndefined);
    if (i == 0) {
      metric.measure_first(cur, row);
    } else {
      const auto t0 = std::chrono::steady_clock::now();
      builder.build(prev, cur, pair);
      const auto t1 = std::chrono::steady_clock::now();
      metric.measure_pair(pair, row);
      if (metric.needs_in_order()) metric.observe_in_order(pair, row);
      const auto t2 = std::chrono::steady_clock::now();
      pair_seconds_ += std::chrono::duration<double>(t1 - t0).count();
      metric_seconds_ += std::chrono::duration<double>(t2 - t1).count();
    }
    for (size_t c = 0; c < columns.size(); ++c) report.series[c].values[i] = row[c];
    prev = std::move(cur);
    cur = FramePlanes{};
  }
  metric.finish(report);
  if (std::getenv("FRAMELINT_DRIFT_TIMING")) {
    std::fprintf(stderr, "pairs %.1f ms/frame, metric %.2f ms/frame\n", 1e3 * pair_seconds_ / frames.size(), 1e3 * metric_seconds_ / frames.size());
  }
  return report;
}

std::vector<cv::Mat> read_video_frames(const std::string& path, int max_frames, int long_side) {
  std::vector<cv::Mat> frames;
  if (!std::filesystem::exists(path)) return frames;
  // Probe the size through ffmpeg's own scaler: width long_side, even height.
  const std::string probe = "ffprobe -v error -select_streams v:0 -show_entries stream=width,height "
                            "-of csv=p=0 '" + path + "'";
  FILE* p = popen(probe.c_str(), "r");
  if (!p) return frames;
  int w = 0, h = 0;
  const int got = fscanf(p, "%d,%d", &w, &h);
  pclose(p);
  if (got != 2 || w <= 0 || h <= 0) return frames;
  int out_w = long_side, out_h = long_side;
  if (w >= h) {
    out_h = 2 * static_cast<int>(std::lround(static_cast<double>(h) * long_side / w / 2.0));
  } else {
    out_w = 2 * static_cast<int>(std::lround(static_cast<double>(w) * long_side / h / 2.0));
  }
  const std::string cmd = "ffmpeg -v error -i '" + path + "' -frames:v " + std::to_string(max_frames) +
                          " -vf scale=" + std::to_string(out_w) + ":" + std::to_string(out_h) +
                          ":flags=area -f rawvideo -pix_fmt bgr24 - 2>/dev/null";
  FILE* pipe = popen(cmd.c_str(), "r");
  if (!pipe) return frames;
  const size_t bytes = static_cast<size_t>(out_w) * out_h * 3;
  while (static_cast<int>(frames.size()) < max_frames) {
    cv::Mat frame(out_h, out_w, CV_8UC3);
    if (fread(frame.data, 1, bytes, pipe) != bytes) break;
    frames.push_back(frame);
  }
  pclose(pipe);
  return frames;
}

std::string opencv_sample(const std::string& name) {
  const std::string path = "/usr/share/doc/opencv-doc/examples/data/" + name;
  return std::filesystem::exists(path) ? path : "";
}

}  // namespace framelint::test
