#include "analyzer/drift/proposals.h"

#include <algorithm>
#include <cmath>

#include <opencv2/imgproc.hpp>

#include "analyzer/drift/sampling.h"
#include "analyzer/drift/similarity_fit.h"

namespace framelint::drift {

NodeGrid NodeGrid::for_frame(int width, int height, int step) {
  NodeGrid g;
  g.step = std::max(1, step);
  g.cols = std::max(1, width / g.step);
  g.rows = std::max(1, height / g.step);
  return g;
}

void mark_moving_nodes(const FramePair& pair, const NodeGrid& grid, float threshold_px,
                       cv::Mat& moving) {
  cv::Mat raw(grid.rows, grid.cols, CV_8U, cv::Scalar(0));
  const float limit = threshold_px * threshold_px;
  const cv::Mat& valid = pair.valid;
  for (int r = 0; r < grid.rows; ++r) {
    for (int c = 0; c < grid.cols; ++c) {
      const cv::Point2f p = grid.position(c, r);
      const cv::Vec2f f = sample_flow(pair.flow_forward, p);
      const cv::Point2f moved(p.x + f[0], p.y + f[1]);
      if (moved.x < 0 || moved.y < 0 || moved.x > valid.cols - 1 || moved.y > valid.rows - 1) {
        continue;
      }
      if (!valid.empty() && valid.at<uint8_t>(cvRound(moved.y), cvRound(moved.x)) == 0) continue;
      const cv::Point2f d = moved - apply_homography(pair.camera_homography, p);
      if (d.x * d.x + d.y * d.y > limit) raw.at<uint8_t>(r, c) = 255;
    }
  }
  moving.create(grid.rows, grid.cols, CV_8U);
  for (int r = 0; r < grid.rows; ++r) {
    for (int c = 0; c < grid.cols; ++c) {
      int neighbours = 0;
      for (int dr = -1; dr <= 1; ++dr) {
        for (int dc = -1; dc <= 1; ++dc) {
          const int rr = r + dr, cc = c + dc;
          if ((dr || dc) && rr >= 0 && cc >= 0 && rr < grid.rows && cc < grid.cols) {
            neighbours += raw.at<uint8_t>(rr, cc) != 0;
          }
        }
      }
      moving.at<uint8_t>(r, c) = raw.at<uint8_t>(r, c) && neighbours >= 2 ? 255 : 0;
    }
  }
}

void keep_nodes_of_own_motion(const FramePair& pair, RegionProposal& region) {
  std::vector<cv::Point2f> moved(region.points.size());
  for (size_t i = 0; i < region.points.size(); ++i) {
    const cv::Vec2f f = sample_flow(pair.flow_forward, region.points[i]);
    moved[i] = region.points[i] + cv::Point2f(f[0], f[1]);
  }
  Similarity own;
  std::vector<uint8_t> inliers;
  if (!fit_similarity(region.points, moved, 0.5f, 17, own, inliers)) return;
  size_t kept = 0;
  for (size_t i = 0; i < region.points.size(); ++i) {
    const cv::Point2f by_own = own.apply(region.points[i]) - moved[i];
    const cv::Point2f by_camera = apply_homography(pair.camera_homography, region.points[i]) - moved[i];
    // Flow is smeared across motion boundaries; a node that the object's
    // motion explains less than twice as well as the camera's is background.
    if (4 * by_own.dot(by_own) < by_camera.dot(by_camera)) region.points[kept++] = region.points[i];
  }
  region.points.resize(kept);
}

std::vector<RegionProposal> propose_moving_regions(const FramePair& pair, const cv::Mat& moving,
                                                   const cv::Mat& covered, const NodeGrid& grid,
                                                   int min_nodes) {
  std::vector<RegionProposal> out;
  cv::Mat closed, labels, stats, centroids;
  cv::morphologyEx(moving, closed, cv::MORPH_CLOSE,
                   cv::getStructuringElement(cv::MORPH_RECT, {3, 3}));
  const int count = cv::connectedComponentsWithStats(closed, labels, stats, centroids, 8, CV_32S);
  const int max_nodes = static_cast<int>(0.4 * grid.rows * grid.cols);
  for (int label = 1; label < count; ++label) {
    const int left = stats.at<int>(label, cv::CC_STAT_LEFT);
    const int top = stats.at<int>(label, cv::CC_STAT_TOP);
    const int w = stats.at<int>(label, cv::CC_STAT_WIDTH);
    const int h = stats.at<int>(label, cv::CC_STAT_HEIGHT);
    const int area = stats.at<int>(label, cv::CC_STAT_AREA);
    if (area < min_nodes || area > max_nodes) continue;
    if (left == 0 || top == 0 || left + w >= grid.cols || top + h >= grid.rows) continue;
    RegionProposal region;
    int already = 0;
    for (int r = top; r < top + h; ++r) {
      for (int c = left; c < left + w; ++c) {
        if (labels.at<int>(r, c) != label || !moving.at<uint8_t>(r, c)) continue;
        if (!covered.empty() && covered.at<uint8_t>(r, c)) ++already;
        region.points.push_back(grid.position(c, r));
      }
    }
    if (already * 10 > static_cast<int>(region.points.size()) * 3) continue;
    keep_nodes_of_own_motion(pair, region);
    if (static_cast<int>(region.points.size()) < min_nodes) continue;
    region.box = cv::boundingRect(region.points);
    region.score = static_cast<float>(region.points.size());
    out.push_back(std::move(region));
  }
  std::sort(out.begin(), out.end(), [](const auto& a, const auto& b) { return a.score > b.score; });
  return out;
}

std::vector<RegionProposal> propose_scene_cells(const cv::Mat& magnitude, const cv::Mat& moving,
                                                const cv::Mat& covered, const NodeGrid& grid,
                                                float min_texture) {
  const bool portrait = grid.rows > grid.cols;
  const int cells_x = portrait ? 2 : 3, cells_y = portrait ? 3 : 2;
  cv::Mat excluded;
  cv::dilate(moving, excluded, cv::getStructuringElement(cv::MORPH_RECT, {3, 3}));
  std::vector<RegionProposal> out;
  for (int cy = 0; cy < cells_y; ++cy) {
    for (int cx = 0; cx < cells_x; ++cx) {
      const int c0 = cx * grid.cols / cells_x, c1 = (cx + 1) * grid.cols / cells_x;
      const int r0 = cy * grid.rows / cells_y, r1 = (cy + 1) * grid.rows / cells_y;
      RegionProposal cell;
      int nodes = 0, blocked = 0;
      double texture = 0;
      for (int r = r0; r < r1; r += 2) {
        for (int c = c0; c < c1; c += 2) {
          ++nodes;
          const bool busy = excluded.at<uint8_t>(r, c) ||
                            (!covered.empty() && covered.at<uint8_t>(r, c));
          if (busy) {
            ++blocked;
            continue;
          }
          const cv::Point2f p = grid.position(c, r);
          texture += magnitude.at<float>(cvRound(p.y), cvRound(p.x));
          cell.points.push_back(p);
        }
      }
      if (nodes == 0 || blocked * 2 > nodes || cell.points.empty()) continue;
      cell.score = static_cast<float>(texture / cell.points.size());
      if (cell.score < min_texture) continue;
      cell.box = cv::Rect(c0 * grid.step, r0 * grid.step, (c1 - c0) * grid.step,
                          (r1 - r0) * grid.step);
      out.push_back(std::move(cell));
    }
  }
  std::sort(out.begin(), out.end(), [](const auto& a, const auto& b) { return a.score > b.score; });
  return out;
}

}  // namespace framelint::drift
