#include "analyzer/drift/drift_tracker.h"

#include <algorithm>
#include <cmath>
#include <set>

#include <opencv2/imgproc.hpp>

#include "analyzer/drift/sampling.h"
#include "analyzer/drift/scene_departure.h"

namespace clipwarden::drift {
namespace {

constexpr int kHistogramBins = 32;

cv::Matx33d normalised(const cv::Matx33d& h) {
  return std::abs(h(2, 2)) > 1e-12 ? h * (1.0 / h(2, 2)) : h;
}

void gray_histogram(const cv::Mat& gray, cv::Mat& hist) {
  const int channels[] = {0};
  const int sizes[] = {kHistogramBins};
  const float range[] = {0, 256};
  const float* ranges[] = {range};
  cv::calcHist(&gray, 1, channels, cv::Mat(), hist, 1, sizes, ranges);
  cv::normalize(hist, hist, 1, 0, cv::NORM_L1);
}

// Bhattacharyya distance between the gray-level histograms of the pair.
double histogram_distance(const FramePair& pair) {
  cv::Mat prev, cur;
  gray_histogram(pair.prev->gray, prev);
  gray_histogram(pair.cur->gray, cur);
  return cv::compareHist(prev, cur, cv::HISTCMP_BHATTACHARYYA);
}

}  // namespace

DriftTracker::DriftTracker(int max_objects) : max_objects_(std::max(1, max_objects)) {}

int DriftTracker::active_count() const {
  return static_cast<int>(std::count_if(objects_.begin(), objects_.end(),
                                        [](const ObjectTrack& o) { return !o.ended; }));
}

namespace {

// An ended object is never followed again and the report reads only its
// history: its points (about 110 bytes each, a hundred or more per object)
// are let go, so a long clip that follows hundreds of objects in turn does
// not keep every one's point set to its end.
void release_points(ObjectTrack& object) { std::vector<TrackPoint>().swap(object.points); }

bool followable(const FramePair& pair) {
  return pair.prev && pair.cur && !pair.cur->bgr.empty() && !pair.flow_forward.empty() &&
         !pair.flow_backward.empty();
}

}  // namespace

// What prepare() leaves in a pair's scratch for step(): the features of the
// pair's current frame and the pair's histogram distance.
struct DriftTracker::PreparedFrame {
  FrameFeatures features;
  double cut_distance = std::numeric_limits<double>::quiet_NaN();
};

void DriftTracker::prepare(const FramePair& pair) const {
  if (!followable(pair)) return;
  // The same radius as step() uses: params_ is a function of the frame size.
  const DriftParams params =
      DriftParams::for_frame(pair.cur->bgr.cols, pair.cur->bgr.rows, max_objects_);
  PreparedFrame& prepared = pair.scratch.slot<PreparedFrame>(this);
  // The histogram distance is needed only where the flow fails (is_cut).
  prepared.cut_distance = pair.valid_fraction < params.cut_valid_fraction
                              ? histogram_distance(pair)
                              : std::numeric_limits<double>::quiet_NaN();
  prepared.features.compute(pair.cur->index, pair.cur->gray, pair.cur->bgr,
                            params.window_radius_px);
}

FrameDrift DriftTracker::step(const FramePair& pair) {
  FrameDrift result;
  if (!followable(pair)) return result;
  if (!params_ready_) {
    params_ = DriftParams::for_frame(pair.cur->bgr.cols, pair.cur->bgr.rows, max_objects_);
    params_ready_ = true;
    frame_area_px_ = static_cast<double>(pair.cur->bgr.cols) * pair.cur->bgr.rows;
  }
  // Features of the previous frame are those of "current" one step earlier
  // (computed here only for the first pair); those of the current frame were
  // normally prepared in the pair's scratch. Swapping them in hands the
  // scratch the old buffers for reuse.
  std::swap(prev_features_, cur_features_);
  if (prev_features_.frame_index() != pair.prev->index) {
    prev_features_.compute(pair.prev->index, pair.prev->gray, pair.prev->bgr,
                           params_.window_radius_px);
  }
  double cut_distance = std::numeric_limits<double>::quiet_NaN();
  PreparedFrame& prepared = pair.scratch.slot<PreparedFrame>(this);
  if (prepared.features.frame_index() == pair.cur->index) {
    std::swap(cur_features_, prepared.features);
    cut_distance = prepared.cut_distance;
  } else {
    cur_features_.compute(pair.cur->index, pair.cur->gray, pair.cur->bgr, params_.window_radius_px);
  }

  if (shot_active_ && is_cut(pair, cut_distance)) {
    end_shot(pair);
    result.cut = true;
    return result;
  }
  if (!shot_active_) {
    start_shot(pair);
  } else if (pair.cur->t_s - last_proposal_t_s_ >= params_.proposal_interval_s - 1e-9) {
    propose(pair, false);
  }

  camera_path_cur_ = normalised(pair.camera_homography * camera_path_prev_);
  advect(pair, anchors_);
  for (auto& object : objects_) {
    if (!object.ended) advect(pair, object.points);
  }
  fit_global_illumination();

  for (auto& object : objects_) {
    if (object.ended) continue;
    const ObjectSample sample = update_object(pair, object);
    object.history.push_back(sample);
    if (!object.ended) object.last_frame = pair.cur->index;
    else release_points(object);
    if (std::isfinite(sample.drift) && !(sample.drift <= result.drift)) {
      result.drift = sample.drift;
      result.color_de00 = sample.color_de00;
      result.structure = sample.structure;
      result.size_pct = sample.size_window_pct;
      result.object_id = object.id;
    }
  }
  // Anchors that lost their chain are dropped, not predicted.
  std::erase_if(anchors_, [](const TrackPoint& p) { return p.state != PointState::tracked; });
  camera_path_prev_ = camera_path_cur_;
  illumination_prev_ = illumination_cur_;
  return result;
}

std::vector<int64_t> DriftTracker::finish() {
  for (auto& object : objects_) {
    if (object.ended) continue;
    object.ended = true;
    object.end_reason = "clip_end";
    release_points(object);
  }
  return hold_scene_departures(objects_, frame_area_px_);
}

FrameDrift DriftTracker::worst_at(int64_t frame) const {
  FrameDrift worst;
  for (const auto& object : objects_) {
    // Histories run in frame order: the sample of `frame`, if any.
    const auto it = std::lower_bound(
        object.history.begin(), object.history.end(), frame,
        [](const ObjectSample& s, int64_t f) { return s.frame < f; });
    if (it == object.history.end() || it->frame != frame || it == object.history.begin()) continue;
    if (std::isfinite(it->drift) && !(it->drift <= worst.drift)) {
      worst.drift = it->drift;
      worst.color_de00 = it->color_de00;
      worst.structure = it->structure;
      worst.size_pct = it->size_window_pct;
      worst.object_id = object.id;
    }
  }
  return worst;
}

bool DriftTracker::is_cut(const FramePair& pair, double distance) {
  // A cut: the flow finds almost no consistent correspondence AND the
  // picture's gray-level distribution changes a lot (a fast pan keeps its
  // histogram; common practice in shot-boundary detection).
  if (pair.valid_fraction >= params_.cut_valid_fraction) return false;
  if (std::isnan(distance)) distance = histogram_distance(pair);
  return distance > params_.cut_histogram_distance;
}

void DriftTracker::start_shot(const FramePair& pair) {
  shot_active_ = true;
  camera_path_prev_ = cv::Matx33d::eye();
  illumination_prev_ = IlluminationMap{};
  illumination_cur_ = IlluminationMap{};
  contrast_gain_ = 1;
  anchors_.clear();
  propose(pair, true);
}

void DriftTracker::end_shot(const FramePair& pair) {
  for (auto& object : objects_) {
    if (object.ended) continue;
    object.ended = true;
    object.end_reason = "cut";
    object.last_frame = pair.prev->index;
    release_points(object);
  }
  anchors_.clear();
  shot_active_ = false;
}

void DriftTracker::seed_point(cv::Point2f p, TrackPoint& point, bool with_structure) const {
  point.pos = p;
  point.ref_pos = p;
  point.state = PointState::tracked;
  point.present = true;
  point.ref_rgb = illumination_prev_.invert(prev_features_.colour(p));
  point.ref_gray = prev_features_.gray(p);
  point.ref_slope = sample_gray_gradient(prev_features_.magnitude(), p) / 255.0f;
  if (!with_structure) return;  // illumination anchors need colour only
  const float mass = prev_features_.local_histogram(p, params_.histogram_radius_px,
                                                    params_.histogram_stride_px, 0, point.ref_hist);
  // Like the colour, the gradient reference is kept in the contrast of the
  // shot's first frame.
  const float to_shot = 1.0f / std::max(0.2f, illumination_prev_.mean_gain());
  for (auto& bin : point.ref_hist) bin *= to_shot;
  point.ref_mass = mass * to_shot;
}

void DriftTracker::mark_covered_nodes(const NodeGrid& grid, cv::Mat& covered) const {
  covered.create(grid.rows, grid.cols, CV_8U);
  covered.setTo(0);
  for (const auto& object : objects_) {
    if (object.ended) continue;
    for (const auto& p : object.points) {
      if (p.state == PointState::outside) continue;
      const cv::Point n = grid.node_of(p.pos);
      for (int dr = -1; dr <= 1; ++dr) {
        for (int dc = -1; dc <= 1; ++dc) {
          const int r = n.y + dr, c = n.x + dc;
          if (r >= 0 && c >= 0 && r < grid.rows && c < grid.cols) covered.at<uint8_t>(r, c) = 255;
        }
      }
    }
  }
}

void DriftTracker::propose(const FramePair& pair, bool shot_start) {
  last_proposal_t_s_ = pair.cur->t_s;
  const FramePlanes& frame = *pair.prev;
  const NodeGrid grid = NodeGrid::for_frame(frame.bgr.cols, frame.bgr.rows, params_.object_step_px);
  const float threshold =
      std::max(params_.min_mover_step_px, params_.min_mover_speed_px_s * static_cast<float>(pair.dt_s));
  mark_moving_nodes(pair, grid, threshold, motion_masks_);
  mark_covered_nodes(grid, covered_nodes_);

  int free_slots = max_objects_ - active_count();
  for (const auto& region :
       propose_moving_regions(pair, motion_masks_, covered_nodes_, grid, params_.min_mover_points)) {
    if (free_slots <= 0) break;
    add_object(region, ObjectKind::moving, pair);
    --free_slots;
  }
  // Scene cells leave a reserve of slots for objects that enter later.
  const int reserve = std::max(1, max_objects_ / 4);
  int scene_slots = std::min(free_slots, max_objects_ - reserve - active_count());
  if (scene_slots > 0) {
    mark_covered_nodes(grid, covered_nodes_);
    for (const auto& cell : propose_scene_cells(prev_features_.magnitude(), motion_masks_.flow,
                                                covered_nodes_, grid, 0.5f)) {
      if (scene_slots <= 0) break;
      add_object(cell, ObjectKind::scene, pair);
      --scene_slots;
    }
  }
  (void)shot_start;
  top_up_anchors(pair);
}

// Points whose window lies wholly on the object: their reference look holds
// no background, so they anchor the alignment (reference_alignment.h).
void mark_interior_points(std::vector<TrackPoint>& points, int spacing) {
  if (points.empty()) return;
  std::set<std::pair<int, int>> nodes;
  auto node = [spacing](cv::Point2f p) {
    return std::pair<int, int>(static_cast<int>(std::lround(p.x / spacing)),
                               static_cast<int>(std::lround(p.y / spacing)));
  };
  for (const auto& p : points) nodes.insert(node(p.ref_pos));
  for (auto& p : points) {
    const auto [x, y] = node(p.ref_pos);
    p.interior = nodes.count({x - 1, y}) && nodes.count({x + 1, y}) && nodes.count({x, y - 1}) &&
                 nodes.count({x, y + 1});
  }
}

void DriftTracker::add_object(const RegionProposal& region, ObjectKind kind,
                              const FramePair& pair) {
  ObjectTrack object;
  object.id = next_id_++;
  object.kind = kind;
  object.first_frame = object.last_frame = object.last_seen_frame = pair.prev->index;
  object.first_t_s = pair.prev->t_s;
  object.confirmed = kind == ObjectKind::scene;
  object.camera_at_reference = camera_path_prev_;
  object.points.resize(region.points.size());
  cv::Point2f sum(0, 0);
  for (size_t i = 0; i < region.points.size(); ++i) {
    seed_point(region.points[i], object.points[i], true);
    sum += region.points[i];
  }
  object.ref_centroid = sum * (1.0f / static_cast<float>(region.points.size()));
  if (kind == ObjectKind::scene) {
    const cv::Point2f centre(region.box.x + 0.5f * region.box.width,
                             region.box.y + 0.5f * region.box.height);
    for (auto& p : object.points)
      p.quarter = static_cast<uint8_t>((p.ref_pos.x >= centre.x) + 2 * (p.ref_pos.y >= centre.y));
  }
  mark_interior_points(object.points,
                       kind == ObjectKind::moving ? params_.object_step_px : 2 * params_.object_step_px);
  object.ref_extent_px = static_cast<float>(std::max(region.box.width, region.box.height));
  object.motion = Similarity{};
  ObjectSample first;
  first.frame = pair.prev->index;
  first.t_s = pair.prev->t_s;
  first.box = cv::Rect2f(region.box);
  first.drift = first.color_de00 = first.structure = first.size_pct = first.size_window_pct = 0;
  first.visible_fraction = 1;
  if (kind == ObjectKind::moving) first.own_colour_de00 = 0;
  object.history.push_back(first);
  objects_.push_back(std::move(object));
}

void DriftTracker::top_up_anchors(const FramePair& pair) {
  const FramePlanes& frame = *pair.prev;
  const NodeGrid grid = NodeGrid::for_frame(frame.bgr.cols, frame.bgr.rows, params_.anchor_step_px);
  cv::Mat occupied(grid.rows, grid.cols, CV_8U, cv::Scalar(0));
  for (const auto& p : anchors_) {
    const cv::Point n = grid.node_of(p.pos);
    if (n.x >= 0 && n.y >= 0 && n.x < grid.cols && n.y < grid.rows) occupied.at<uint8_t>(n) = 1;
  }
  for (int r = 0; r < grid.rows; ++r) {
    for (int c = 0; c < grid.cols; ++c) {
      if (occupied.at<uint8_t>(r, c)) continue;
      TrackPoint& p = anchors_.emplace_back();
      seed_point(grid.position(c, r), p, false);
    }
  }
}

void DriftTracker::advect(const FramePair& pair, std::vector<TrackPoint>& points) const {
  const cv::Mat& frame = pair.cur->bgr;
  for (auto& p : points) {
    if (p.state != PointState::tracked) continue;
    const cv::Vec2f f = sample_flow(pair.flow_forward, p.pos);
    const cv::Point2f moved(p.pos.x + f[0], p.pos.y + f[1]);
    p.flow_step = cv::Point2f(f[0], f[1]);
    if (!inside(frame, moved)) {
      p.pos = moved;
      p.state = PointState::outside;
      continue;
    }
    // Forward-backward check of Sundaram, Brox & Keutzer (ECCV 2010) at the
    // point itself: |w + w^(x+w)|^2 < 0.01 (|w|^2 + |w^(x+w)|^2) + 0.5.
    const cv::Vec2f b = sample_flow(pair.flow_backward, moved);
    const cv::Vec2f sum = f + b;
    const float limit = 0.01f * (f.dot(f) + b.dot(b)) + 0.5f;
    p.pos = moved;
    if (sum.dot(sum) >= limit) p.state = PointState::occluded;
  }
}

void DriftTracker::fit_global_illumination() {
  // The illumination of the frame is read from the static scene (anchors
  // and scene cells): moving objects are where drift is most likely, and a
  // drifting object must not bend the fit. Only when the scene offers too
  // few points do moving objects join in.
  constexpr size_t kMinScenePoints = 100;
  fit_ref_.clear();
  fit_cur_.clear();
  auto collect = [&](const std::vector<TrackPoint>& points) {
    for (const auto& p : points) {
      if (p.state != PointState::tracked) continue;
      fit_ref_.push_back(p.ref_rgb);
      fit_cur_.push_back(cur_features_.colour(p.pos));
    }
  };
  collect(anchors_);
  for (const auto& object : objects_) {
    if (!object.ended && object.kind == ObjectKind::scene) collect(object.points);
  }
  if (fit_ref_.size() < kMinScenePoints) {
    for (const auto& object : objects_) {
      if (!object.ended && object.kind == ObjectKind::moving) collect(object.points);
    }
  }
  illumination_cur_ = fit_illumination(fit_ref_, fit_cur_, fit_scratch_);
  contrast_gain_ = std::clamp(illumination_cur_.mean_gain(), 0.2f, 5.0f);
}

}  // namespace clipwarden::drift
