// Follows objects through a clip by the optical flow already computed for
// each frame pair and measures how far each departs from its own first look
// (colour, structure, size). Fed one FramePair at a time, in frame order.
//
// Method (docs/drift.md): material points on a grid, advected by the forward
// flow and dropped from their chain where the forward-backward check fails;
// objects are groups of points (regions moving apart from the camera, and
// textured cells of the static scene); the global illumination change is
// fitted over all points and removed; each object's colour, gradient
// structure and size are compared with the same points' reference.
#pragma once

#include <cstdint>
#include <limits>
#include <vector>

#include <opencv2/core.hpp>

#include "analyzer/color/color_space.h"
#include "analyzer/drift/drift_params.h"
#include "analyzer/drift/frame_features.h"
#include "analyzer/drift/illumination_fit.h"
#include "analyzer/drift/object_track.h"
#include "analyzer/drift/proposals.h"
#include "analyzer/frame/frame_pair.h"

namespace clipwarden::drift {

// Marks the points whose four grid neighbours (at `spacing`) are also
// points of the object: their windows hold no background.
void mark_interior_points(std::vector<TrackPoint>& points, int spacing);

// Appearance of an object's visible points, summed for means.
struct AppearanceSums {
  double pred[3] = {0, 0, 0};  // L*, a*, b* of the reference, illumination applied
  double now[3] = {0, 0, 0};   // L*, a*, b* seen now
  OrientationHistogram ref_hist{}, cur_hist{};
  float ref_mass = 0;
  int count = 0;
  // The same colour sums per quarter (TrackPoint::quarter), kept for scene
  // cells only: nothing else is read in quarters.
  double quarter_pred[4][3] = {}, quarter_now[4][3] = {};
  int quarter_count[4] = {};
  // `predicted` and `cur` in CIELAB (converted once per point, by the caller).
  void add_colour(const TrackPoint& p, const color::Lab& predicted, const color::Lab& cur,
                  bool by_quarter);
  void add_structure(const TrackPoint& p, const OrientationHistogram& hist);
};

// An object's gray levels now = gain * reference + offset.
struct GrayFit {
  double gain = 1, offset = 0;
};

// What became of an object's points this frame.
struct PointCounts {
  int tracked = 0;   // followed, or re-acquired
  int visible = 0;   // tracked and looking like their reference
  int absent = 0;    // tracked but looking like something else
  int covered = 0;   // hidden behind content that was visible before
  int revealed = 0;  // hidden, and new content appears at their place
  int outside = 0;   // out of the frame
  cv::Rect2f box;
};

// How an object looks this frame against its reference.
struct ObjectLook {
  double colour_de00 = 0;
  // With the object's brightness change removed; moving objects only.
  double own_colour_de00 = std::numeric_limits<double>::quiet_NaN();
  cv::Vec3f colour_now, colour_ref;  // mean CIELAB now, and of the reference
  bool measured = false;
};

// The worst object of one frame.
struct FrameDrift {
  double drift = std::numeric_limits<double>::quiet_NaN();
  double color_de00 = std::numeric_limits<double>::quiet_NaN();
  double structure = std::numeric_limits<double>::quiet_NaN();
  double size_pct = std::numeric_limits<double>::quiet_NaN();
  int object_id = 0;
  bool cut = false;
};

class DriftTracker {
 public:
  explicit DriftTracker(int max_objects);

  // Computes the features of the pair's current frame ahead of step() into
  // the pair's scratch (FramePair::scratch); depends on the pair only, so it
  // may run on any thread, for several pairs at once (Metric::measure_pair).
  // Optional: step() computes whatever was not prepared.
  void prepare(const FramePair& pair) const;

  FrameDrift step(const FramePair& pair);
  // Ends every object still followed ("clip_end"), then holds under review
  // the readings of departures spread over the scene (scene_departure.h):
  // returns the frames whose readings it held, whose worst object
  // (worst_at) step() no longer gives.
  std::vector<int64_t> finish();
  // The worst object's reading of `frame`, from the objects' histories.
  FrameDrift worst_at(int64_t frame) const;

  // Every object, ended ones included, in order of creation.
  const std::vector<ObjectTrack>& objects() const { return objects_; }

 private:
  struct PreparedFrame;
  void start_shot(const FramePair& pair);
  void end_shot(const FramePair& pair);
  void propose(const FramePair& pair, bool shot_start);
  void add_object(const RegionProposal& region, ObjectKind kind, const FramePair& pair);
  void seed_point(cv::Point2f p, TrackPoint& point, bool with_structure) const;
  void top_up_anchors(const FramePair& pair);
  void advect(const FramePair& pair, std::vector<TrackPoint>& points) const;
  void fit_global_illumination();
  // Fits motion, predicts and re-acquires hidden points, measures appearance,
  // decides whether the object goes on. Returns the sample for this frame.
  ObjectSample update_object(const FramePair& pair, ObjectTrack& object);
  void fit_object_motion(const FramePair& pair, ObjectTrack& object);
  double object_scale(const ObjectTrack& object);
  // Counts the object's points and sums their colour (all_, interior_);
  // the indices of the points summed are left in `observed_`.
  void observe_points(const FramePair& pair, ObjectTrack& object, PointCounts& counts);
  // Sums the gradient-orientation histograms of the observed points into
  // `sums` (interior points only when `interior_only`), in the order they
  // were observed. Done only for a look that is read: the histograms are
  // the largest per-point cost of the serial stage.
  void sum_structure(const ObjectTrack& object, bool interior_only, AppearanceSums& sums);
  void confirm_support(const FramePair& pair, ObjectTrack& object);
  void decide_state(const FramePair& pair, ObjectTrack& object, const PointCounts& counts);
  bool looks_like_itself(const PointCounts& counts) const;
  // A scene cell's largest quarter own colour change beyond the quarter's
  // clean level, in ΔE00; NaN when not read.
  float read_quarters(const FramePair& pair, ObjectTrack& object, const AppearanceSums& s) const;
  bool seen_well(const PointCounts& counts, int inside_count) const;
  bool breaks_continuity(const ObjectTrack& object, const ObjectSample& now) const;
  GrayFit fit_object_gray(const ObjectTrack& object) const;
  bool behind_other_object(const ObjectTrack& object, const cv::Rect2f& box) const;
  static float last_size_pct(const ObjectTrack& object);
  float size_change_over_window(const ObjectTrack& object, const ObjectSample& now) const;
  bool point_present(const TrackPoint& point, const GrayFit& fit) const;
  // `histogram_distance` as prepared, or NaN to compute it here.
  bool is_cut(const FramePair& pair, double histogram_distance);
  void mark_covered_nodes(const NodeGrid& grid, cv::Mat& covered) const;
  int active_count() const;

  int max_objects_;
  DriftParams params_;
  bool params_ready_ = false;
  double frame_area_px_ = 0;
  bool shot_active_ = false;
  int next_id_ = 1;
  double last_proposal_t_s_ = 0;

  FrameFeatures prev_features_, cur_features_;
  cv::Matx33d camera_path_prev_ = cv::Matx33d::eye();  // shot start -> previous frame
  cv::Matx33d camera_path_cur_ = cv::Matx33d::eye();
  IlluminationMap illumination_prev_, illumination_cur_;
  float contrast_gain_ = 1;

  std::vector<ObjectTrack> objects_;
  std::vector<TrackPoint> anchors_;  // illumination anchors, in no object

  // Scratch reused every frame (no steady-state allocation).
  std::vector<cv::Vec3f> fit_ref_, fit_cur_;
  std::vector<float> fit_scratch_;
  std::vector<cv::Point2f> src_, dst_, aligned_;
  std::vector<float> templates_;
  std::vector<int> src_index_;
  std::vector<uint8_t> inliers_;
  std::vector<float> ratios_, ratios_x_, ratios_y_;  // pair distance ratios: all, along x, along y
  AppearanceSums all_, interior_;
  std::vector<int> observed_;  // points summed by observe_points, in order
  MotionMasks motion_masks_;
  cv::Mat covered_nodes_;
};

}  // namespace clipwarden::drift
