#include "analyzer/drift/proposals.h"

#include <algorithm>
#include <cmath>
#include <set>

#include <opencv2/imgproc.hpp>

#include "analyzer/drift/sampling.h"
#include "analyzer/drift/similarity_fit.h"

namespace clipwarden::drift {

NodeGrid NodeGrid::for_frame(int width, int height, int step) {
  NodeGrid g;
  g.step = std::max(1, step);
  g.cols = std::max(1, width / g.step);
  g.rows = std::max(1, height / g.step);
  return g;
}

namespace {

// Mean |prev - cur seen through the camera motion| per node cell: sharp at
// the moving object itself, unlike the flow, which coarse-to-fine
// estimation smears over a halo of static background around it.
void compensated_difference(const FramePair& pair, const NodeGrid& grid, cv::Mat& cells) {
  cv::Mat cur_in_prev, diff;
  cv::warpPerspective(pair.cur->gray, cur_in_prev, cv::Mat(pair.camera_homography),
                      pair.prev->gray.size(), cv::INTER_LINEAR | cv::WARP_INVERSE_MAP,
                      cv::BORDER_REPLICATE);
  cv::absdiff(pair.prev->gray, cur_in_prev, diff);
  const cv::Rect covered(0, 0, grid.cols * grid.step, grid.rows * grid.step);
  cv::resize(diff(covered & cv::Rect(0, 0, diff.cols, diff.rows)), cells,
             cv::Size(grid.cols, grid.rows), 0, 0, cv::INTER_AREA);
}

}  // namespace

namespace {

// Clears nodes with fewer than two marked neighbours (isolated noise).
void drop_isolated(const cv::Mat& raw, cv::Mat& out) {
  out.create(raw.size(), CV_8U);
  for (int r = 0; r < raw.rows; ++r) {
    for (int c = 0; c < raw.cols; ++c) {
      int neighbours = 0;
      for (int dr = -1; dr <= 1; ++dr) {
        for (int dc = -1; dc <= 1; ++dc) {
          const int rr = r + dr, cc = c + dc;
          if ((dr || dc) && rr >= 0 && cc >= 0 && rr < raw.rows && cc < raw.cols) {
            neighbours += raw.at<uint8_t>(rr, cc) != 0;
          }
        }
      }
      out.at<uint8_t>(r, c) = raw.at<uint8_t>(r, c) && neighbours >= 2 ? 255 : 0;
    }
  }
}

}  // namespace

void mark_moving_nodes(const FramePair& pair, const NodeGrid& grid, float threshold_px,
                       MotionMasks& masks) {
  cv::Mat cells;
  compensated_difference(pair, grid, cells);
  // Changed: well above the frame's typical residual difference (noise,
  // compression, a global brightness change) and above 6 gray levels.
  std::vector<uint8_t> values(cells.begin<uint8_t>(), cells.end<uint8_t>());
  std::nth_element(values.begin(), values.begin() + values.size() / 2, values.end());
  const int changed = std::max(6, 3 * static_cast<int>(values[values.size() / 2]));
  cv::Mat flow(grid.rows, grid.cols, CV_8U, cv::Scalar(0));
  cv::Mat core(grid.rows, grid.cols, CV_8U, cv::Scalar(0));
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
      if (d.x * d.x + d.y * d.y <= limit) continue;
      flow.at<uint8_t>(r, c) = 255;
      if (cells.at<uint8_t>(r, c) >= changed) core.at<uint8_t>(r, c) = 255;
    }
  }
  drop_isolated(flow, masks.flow);
  drop_isolated(core, masks.core);
}

// Drops the region's outer ring of nodes (those with a 4-neighbour outside
// the region) when enough remain: the ring straddles the object's edge, where
// the flow is smeared and a node's window holds background.
void peel_outer_ring(const NodeGrid& grid, RegionProposal& region, int min_nodes) {
  std::set<std::pair<int, int>> nodes;
  for (const auto& p : region.points) nodes.insert({grid.node_of(p).x, grid.node_of(p).y});
  std::vector<cv::Point2f> inner;
  for (const auto& p : region.points) {
    const cv::Point n = grid.node_of(p);
    if (nodes.count({n.x - 1, n.y}) && nodes.count({n.x + 1, n.y}) && nodes.count({n.x, n.y - 1}) &&
        nodes.count({n.x, n.y + 1})) {
      inner.push_back(p);
    }
  }
  if (static_cast<int>(inner.size()) >= 2 * min_nodes) region.points = std::move(inner);
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

std::vector<RegionProposal> propose_moving_regions(const FramePair& pair, const MotionMasks& masks,
                                                   const cv::Mat& covered, const NodeGrid& grid,
                                                   int min_nodes) {
  std::vector<RegionProposal> out;
  cv::Mat closed, labels, stats, centroids, component, grown, filled;
  cv::morphologyEx(masks.core, closed, cv::MORPH_CLOSE,
                   cv::getStructuringElement(cv::MORPH_RECT, {3, 3}));
  const int count = cv::connectedComponentsWithStats(closed, labels, stats, centroids, 8, CV_32S);
  const int max_nodes = static_cast<int>(0.4 * grid.rows * grid.cols);
  for (int label = 1; label < count; ++label) {
    const int left = stats.at<int>(label, cv::CC_STAT_LEFT);
    const int top = stats.at<int>(label, cv::CC_STAT_TOP);
    const int w = stats.at<int>(label, cv::CC_STAT_WIDTH);
    const int h = stats.at<int>(label, cv::CC_STAT_HEIGHT);
    if (stats.at<int>(label, cv::CC_STAT_AREA) > max_nodes) continue;
    if (left == 0 || top == 0 || left + w >= grid.cols || top + h >= grid.rows) continue;
    // The changed core, grown by one node and with its holes closed (a flat
    // interior does not change between frames), within the flow's mask.
    component = labels == label;
    cv::dilate(component, grown, cv::getStructuringElement(cv::MORPH_RECT, {3, 3}));
    cv::morphologyEx(component, filled, cv::MORPH_CLOSE,
                     cv::getStructuringElement(cv::MORPH_ELLIPSE, {7, 7}));
    RegionProposal region;
    int already = 0;
    const int r0 = std::max(0, top - 3), r1 = std::min(grid.rows, top + h + 3);
    const int c0 = std::max(0, left - 3), c1 = std::min(grid.cols, left + w + 3);
    for (int r = r0; r < r1; ++r) {
      for (int c = c0; c < c1; ++c) {
        const bool in_core = masks.core.at<uint8_t>(r, c) && component.at<uint8_t>(r, c);
        const bool around = (grown.at<uint8_t>(r, c) || filled.at<uint8_t>(r, c)) &&
                            masks.flow.at<uint8_t>(r, c);
        if (!in_core && !around) continue;
        if (!covered.empty() && covered.at<uint8_t>(r, c)) ++already;
        region.points.push_back(grid.position(c, r));
      }
    }
    if (static_cast<int>(region.points.size()) < min_nodes) continue;
    if (already * 10 > static_cast<int>(region.points.size()) * 3) continue;
    peel_outer_ring(grid, region, min_nodes);
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
          // A node can sit past the last row or column of a frame only a
          // few pixels tall or wide (a 16384x16 clip is 512x1 at work).
          texture += magnitude.at<float>(std::clamp(cvRound(p.y), 0, magnitude.rows - 1),
                                         std::clamp(cvRound(p.x), 0, magnitude.cols - 1));
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

}  // namespace clipwarden::drift
