// One frame of one object: its motion, its hidden points, its appearance
// against the reference, and whether it goes on (drift_tracker.h).
#include <algorithm>
#include <cmath>

#include "analyzer/color/ciede2000.h"
#include "analyzer/drift/drift_tracker.h"
#include "analyzer/drift/reference_alignment.h"
#include "analyzer/drift/sampling.h"

namespace clipwarden::drift {
namespace {

color::Lab lab_of(const cv::Vec3f& bgr) { return color::srgb_to_lab_fast({bgr[2], bgr[1], bgr[0]}); }

// Local scale (sqrt of the Jacobian determinant) of a homography at p.
double local_scale(const cv::Matx33d& h, cv::Point2f p) {
  const cv::Point2f c = apply_homography(h, p);
  const cv::Point2f dx = apply_homography(h, {p.x + 1, p.y}) - c;
  const cv::Point2f dy = apply_homography(h, {p.x, p.y + 1}) - c;
  return std::sqrt(std::abs(static_cast<double>(dx.x) * dy.y - static_cast<double>(dx.y) * dy.x));
}

bool valid_at(const cv::Mat& valid, cv::Point2f p) {
  if (valid.empty()) return true;
  const int x = std::clamp(static_cast<int>(std::lround(p.x)), 0, valid.cols - 1);
  const int y = std::clamp(static_cast<int>(std::lround(p.y)), 0, valid.rows - 1);
  return valid.at<uint8_t>(y, x) != 0;
}

// Median of `values` (reordered), or NaN with fewer than `min_count`.
double median_of(std::vector<float>& values, size_t min_count) {
  if (values.size() < min_count) return std::numeric_limits<double>::quiet_NaN();
  auto mid = values.begin() + static_cast<std::ptrdiff_t>(values.size() / 2);
  std::nth_element(values.begin(), mid, values.end());
  return *mid;
}

// CIEDE2000 between `ref` and `now` after `ref` takes `now`'s brightness.
// A gain k on linear-light XYZ scales f(t) = t^(1/3) by k^(1/3) (above the
// toe of CIE 15:2004's L* curve), so it scales L* + 16, a* and b* alike:
// the brightness change of a surface under more or less light is a common
// scale of (L* + 16, a*, b*). Scaling the reference by the ratio that
// matches L* leaves only a change of hue and saturation, what a repainted
// or recoloured surface shows and a shadow does not. The ratio is held to
// [0.5, 2] (an eighth to eight times the light) so a surface going black
// does not scale its reference to noise.
double hue_change_de00(const color::Lab& ref, const color::Lab& now) {
  const double scale = std::clamp((now.l + 16) / std::max(1.0, ref.l + 16), 0.5, 2.0);
  const color::Lab lit{scale * (ref.l + 16) - 16, scale * ref.a, scale * ref.b};
  return color::ciede2000(lit, now);
}

}  // namespace

void AppearanceSums::add_colour(const TrackPoint& p, const color::Lab& lp, const color::Lab& lc,
                                bool by_quarter) {
  pred[0] += lp.l, pred[1] += lp.a, pred[2] += lp.b;
  now[0] += lc.l, now[1] += lc.a, now[2] += lc.b;
  ++count;
  if (!by_quarter) return;
  const int q = p.quarter & 3;
  quarter_pred[q][0] += lp.l, quarter_pred[q][1] += lp.a, quarter_pred[q][2] += lp.b;
  quarter_now[q][0] += lc.l, quarter_now[q][1] += lc.a, quarter_now[q][2] += lc.b;
  ++quarter_count[q];
}

void AppearanceSums::add_structure(const TrackPoint& p, const OrientationHistogram& hist) {
  for (int k = 0; k < kOrientationBins; ++k) ref_hist[k] += p.ref_hist[k], cur_hist[k] += hist[k];
  ref_mass += p.ref_mass;
}

// A scene cell averages a recolour of a few percent of the frame with the
// rest of the cell (a ΔE00 12 recolour over half a cell read about 6), so
// each quarter of the cell is also read on its own, as its own colour
// (brightness removed, as for moving objects) while the frame's light is
// near the shot's first: a fade or a grade scales every channel far from 1
// and with the brightness freed would read as a hue change (a field scene
// fading to black read 10). Two things count against a quarter's reading:
// - its brightness change, 1 ΔE00 per percent of (L* + 16): light added or
//   taken away locally (a glow, a reflection sweeping over water, coloured
//   shade) changes a surface's hue as it changes its brightness, while a
//   repaint turns the hue at the brightness it had (the demo lantern's
//   reflection read own 4.2 with 9-10% more brightness, injected recolours
//   up to 11.8 within 2.4%);
// - its clean level, the largest reading over the cell's first
//   `quarter_clean_s`: a quarter of dark or flat content reads a few ΔE00
//   of its own from compression and noise alone.
float DriftTracker::read_quarters(const FramePair& pair, ObjectTrack& object,
                                  const AppearanceSums& s) const {
  for (const ChannelAffine& channel : illumination_cur_.channel) {
    if (!(channel.gain <= params_.max_quarter_gain && channel.gain * params_.max_quarter_gain >= 1))
      return kNotMeasured;
  }
  const bool young = pair.cur->t_s - object.first_t_s < params_.quarter_clean_s;
  float largest = kNotMeasured;
  for (int q = 0; q < 4; ++q) {
    if (s.quarter_count[q] < params_.min_quarter_points) continue;
    const double n = s.quarter_count[q];
    const color::Lab pred{s.quarter_pred[q][0] / n, s.quarter_pred[q][1] / n, s.quarter_pred[q][2] / n};
    const color::Lab now{s.quarter_now[q][0] / n, s.quarter_now[q][1] / n, s.quarter_now[q][2] / n};
    const double brightness_pct = 100 * std::abs(std::log((now.l + 16) / std::max(1.0, pred.l + 16)));
    const float reading =
        static_cast<float>(std::max(0.0, hue_change_de00(pred, now) - brightness_pct));
    float& clean = object.quarter_clean_de00[q];
    if (young) clean = std::max(clean, reading);
    const float beyond = std::max(0.f, reading - clean);
    if (!(beyond <= largest)) largest = beyond;
  }
  return largest;
}






float DriftTracker::last_size_pct(const ObjectTrack& object) {
  for (auto it = object.history.rbegin(); it != object.history.rend(); ++it) {
    if (std::isfinite(it->size_pct)) return it->size_pct;
  }
  return 0;
}


void DriftTracker::fit_object_motion(const FramePair& pair, ObjectTrack& object) {
  // Re-anchor the tracked points on their reference look (interior points
  // carry the alignment when there are enough of them).
  int interior_tracked = 0;
  for (const auto& p : object.points) interior_tracked += p.interior && p.state == PointState::tracked;
  const bool interior_only = interior_tracked >= 8;
  aligned_.clear(), templates_.clear();
  for (const auto& p : object.points) {
    if (p.state != PointState::tracked || (interior_only && !p.interior)) continue;
    aligned_.push_back(p.pos);
    templates_.push_back(p.ref_gray);
  }
  AlignmentLimits limits;
  limits.max_shift_px = 2.0f * params_.px_scale;
  limits.max_rim_px = 1.0f * params_.px_scale;
  // Scale is aligned only on objects with a large textured interior; on a
  // small articulated figure (a walking person at 512 px) it follows the
  // limbs and swings by a fifth within a second; the flow's scale is used.
  limits.max_scale_rim_px =
      interior_tracked >= params_.min_points_for_scale_alignment ? 0.5f * params_.px_scale : 0.0f;
  Similarity correction;
  if (align_to_reference(cur_features_.window_gray(), aligned_, templates_, limits, correction)) {
    for (auto& p : object.points) {
      if (p.state == PointState::tracked) p.pos = correction.apply(p.pos);
    }
  }
  // The object's motion from reference to current positions.
  src_.clear(), dst_.clear(), src_index_.clear();
  for (size_t i = 0; i < object.points.size(); ++i) {
    const TrackPoint& p = object.points[i];
    if (p.state != PointState::tracked) continue;
    src_.push_back(p.ref_pos), dst_.push_back(p.pos), src_index_.push_back(static_cast<int>(i));
  }
  const double dt = std::max(pair.dt_s, 1e-6);
  const cv::Point2f centroid_before = object.motion.apply(object.ref_centroid);
  if (src_.size() < 3) {
    // Fully hidden: coast with the last velocity.
    object.motion.tx += object.centroid_velocity_px_s.x * dt;
    object.motion.ty += object.centroid_velocity_px_s.y * dt;
    return;
  }
  const uint32_t seed = static_cast<uint32_t>(object.id * 7919 + pair.cur->index);
  const Similarity motion_before = object.motion;
  fit_similarity(src_, dst_, params_.ransac_inlier_px, seed, object.motion, inliers_);
  if (!object.confirmed) {
    // Probation: does each point move with the object or with the camera?
    for (size_t k = 0; k < src_.size(); ++k) {
      TrackPoint& p = object.points[src_index_[k]];
      const cv::Point2f from = dst_[k] - p.flow_step;
      const cv::Point2f own = object.motion.apply(src_[k]) - motion_before.apply(src_[k]);
      const cv::Point2f camera = apply_homography(pair.camera_homography, from) - from;
      p.own_motion_error += static_cast<float>(cv::norm(p.flow_step - own));
      p.camera_motion_error += static_cast<float>(cv::norm(p.flow_step - camera));
    }
  }
  // A point far off its object's motion has slid onto something else (an
  // occluder dragged it along): it leaves its chain. The static scene moves
  // rigidly with the camera; moving objects may bend (limbs).
  const float slide =
      object.kind == ObjectKind::scene
          ? params_.scene_slide_px
          : std::max(params_.slide_outlier_px,
                     0.15f * object.ref_extent_px * static_cast<float>(object.motion.scale()));
  // Each tracked point is also pulled toward where the object's motion puts
  // it, with a time constant in seconds (frame-rate independent): flow
  // errors that differ from point to point (DIS smooths motion boundaries,
  // so points near an object's edge move too little) would otherwise add up
  // frame after frame and scatter the points over and off the object, while
  // a real bend of the object is renewed by the flow every frame.
  const float pull = static_cast<float>(1.0 - std::exp(-dt / params_.point_pull_time_s));
  for (size_t k = 0; k < src_.size(); ++k) {
    const cv::Point2f model = object.motion.apply(src_[k]);
    const cv::Point2f d = model - dst_[k];
    TrackPoint& p = object.points[src_index_[k]];
    if (d.dot(d) > slide * slide) {
      p.state = PointState::occluded;
    } else {
      p.pos += pull * d;
    }
  }
  const cv::Point2f v =
      (object.motion.apply(object.ref_centroid) - centroid_before) * static_cast<float>(1.0 / dt);
  object.centroid_velocity_px_s = 0.5f * object.centroid_velocity_px_s + 0.5f * v;
}

// Robust scale of the object: the median, over pairs of its tracked points
// that sit well apart, of current distance / reference distance. Unlike a
// least-squares fit it ignores a minority of points that slid.
//
// Only the part of the change the object shows along both of its axes
// counts as size: pairs lying mostly along the object's (de-rotated)
// horizontal and mostly along its vertical give a scale each, and when both
// are measured the size is the one nearer to no change, or none when they
// disagree in sign. A magnification (a defect, or an approach) stretches
// both axes alike; a figure that turns, bends or swings its limbs
// foreshortens one axis only (the width of a person turning sideways), and
// that is pose, not size.
double DriftTracker::object_scale(const ObjectTrack& object) {
  ratios_.clear(), ratios_x_.clear(), ratios_y_.clear();
  const size_t n = src_.size();
  const float min_gap = 0.25f * object.ref_extent_px;
  const double angle = -object.motion.rotation_rad();
  const double c = std::cos(angle), s = std::sin(angle);
  uint32_t state = static_cast<uint32_t>(object.id) * 2654435761u + 12345u;
  for (int k = 0; k < 400 && n >= 2; ++k) {
    state ^= state << 13, state ^= state >> 17, state ^= state << 5;
    const size_t i = state % n, j = (state / 7919u) % n;
    const cv::Point2f ref = src_[i] - src_[j];
    const double ref_len = cv::norm(ref);
    if (i == j || ref_len < min_gap) continue;
    const cv::Point2f now = dst_[i] - dst_[j];
    ratios_.push_back(static_cast<float>(cv::norm(now) / ref_len));
    // The current offset turned back by the object's rotation, so that its
    // components compare with the reference offset's.
    const double now_x = c * now.x - s * now.y, now_y = s * now.x + c * now.y;
    if (std::abs(ref.x) > 2 * std::abs(ref.y))
      ratios_x_.push_back(static_cast<float>(std::abs(now_x / ref.x)));
    if (std::abs(ref.y) > 2 * std::abs(ref.x))
      ratios_y_.push_back(static_cast<float>(std::abs(now_y / ref.y)));
  }
  const double overall = median_of(ratios_, 10);
  const double along_x = median_of(ratios_x_, 10), along_y = median_of(ratios_y_, 10);
  if (!std::isfinite(overall) || !std::isfinite(along_x) || !std::isfinite(along_y)) return overall;
  const double log_x = std::log(along_x), log_y = std::log(along_y);
  if (log_x * log_y <= 0) return 1.0;
  return std::exp(std::abs(log_x) < std::abs(log_y) ? log_x : log_y);
}

// The object's gray pattern now against its reference, over its followed
// points: least-squares gain and offset (the object may get brighter or
// lose contrast as a whole), the gain held to [0.5, 2] so that a faded-out
// object over flat background does not fit with gain 0.
GrayFit DriftTracker::fit_object_gray(const ObjectTrack& object) const {
  double n = 0, sr = 0, sn = 0, srr = 0, srn = 0;
  int interior = 0;
  for (const auto& p : object.points) interior += p.interior && p.state == PointState::tracked;
  const bool interior_only = interior >= 8;
  for (const auto& p : object.points) {
    if (p.state != PointState::tracked || (interior_only && !p.interior)) continue;
    const double r = p.ref_gray, now = cur_features_.gray(p.pos);
    n += 1, sr += r, sn += now, srr += r * r, srn += r * now;
  }
  GrayFit fit;
  if (n < 3) return fit;
  const double var = srr - sr * sr / n;
  if (var > 1e-6 * n) fit.gain = std::clamp((srn - sr * sn / n) / var, 0.5, 2.0);
  fit.offset = (sn - fit.gain * sr) / n;
  return fit;
}


// A point shows its own material when its window-mean gray level matches
// the reference under the object's gain and offset, within a tolerance that
// allows for a pixel and a half of misregistration on its local gradient.
bool DriftTracker::point_present(const TrackPoint& p, const GrayFit& fit) const {
  const double residual = cur_features_.gray(p.pos) - (fit.gain * p.ref_gray + fit.offset);
  return std::abs(residual) <= params_.point_gray_tolerance + 1.5 * p.ref_slope;
}

void DriftTracker::observe_points(const FramePair& pair, ObjectTrack& object, PointCounts& counts) {
  const cv::Mat& frame = pair.cur->bgr;
  counts = PointCounts{};
  observed_.clear();
  const bool by_quarter = object.kind == ObjectKind::scene;
  const GrayFit fit = fit_object_gray(object);
  float x0 = 1e9f, y0 = 1e9f, x1 = -1e9f, y1 = -1e9f;
  for (size_t i = 0; i < object.points.size(); ++i) {
    TrackPoint& p = object.points[i];
    if (p.state == PointState::occluded) {
      p.pos = object.motion.apply(p.ref_pos);
      if (!inside(frame, p.pos)) p.state = PointState::outside;
    }
    if (p.state == PointState::outside) {
      ++counts.outside;
      continue;
    }
    x0 = std::min(x0, p.pos.x), y0 = std::min(y0, p.pos.y);
    x1 = std::max(x1, p.pos.x), y1 = std::max(y1, p.pos.y);
    const bool was_hidden = p.state == PointState::occluded;
    if (was_hidden && !valid_at(pair.valid, p.pos)) {
      ++counts.revealed;  // new content at its place: nothing visible before covers it
      continue;
    }
    const color::Lab predicted = lab_of(illumination_cur_.apply(p.ref_rgb));
    const color::Lab cur = lab_of(cur_features_.colour(p.pos));
    p.present = point_present(p, fit);
    if (was_hidden) {
      // Re-acquired only when both its gray pattern and its colour match.
      const bool colour_match = color::ciede2000(predicted, cur) < params_.reacquire_colour_de00;
      if (!p.present || !colour_match) {
        ++counts.covered;  // something that was visible before is in front of it
        continue;
      }
      p.state = PointState::tracked;
    }
    ++counts.tracked;
    p.present ? ++counts.visible : ++counts.absent;
    observed_.push_back(static_cast<int>(i));
    all_.add_colour(p, predicted, cur, by_quarter);
    if (p.interior) interior_.add_colour(p, predicted, cur, by_quarter);
  }
  if (x1 >= x0) {
    const float pad = 0.5f * params_.object_step_px;
    counts.box = cv::Rect2f(cv::Point2f(std::max(0.f, x0 - pad), std::max(0.f, y0 - pad)),
                            cv::Point2f(std::min<float>(frame.cols, x1 + pad),
                                        std::min<float>(frame.rows, y1 + pad)));
  }
}

void DriftTracker::sum_structure(const ObjectTrack& object, bool interior_only,
                                 AppearanceSums& sums) {
  const float rotation = static_cast<float>(object.motion.rotation_rad());
  OrientationHistogram hist;
  for (const int i : observed_) {
    const TrackPoint& p = object.points[static_cast<size_t>(i)];
    if (interior_only && !p.interior) continue;
    cur_features_.local_histogram(p.pos, params_.histogram_radius_px, params_.histogram_stride_px,
                                  rotation, hist);
    sums.add_structure(p, hist);
  }
}

ObjectSample DriftTracker::update_object(const FramePair& pair, ObjectTrack& object) {
  ObjectSample sample;
  sample.frame = pair.cur->index;
  sample.t_s = pair.cur->t_s;
  fit_object_motion(pair, object);
  const double scale = src_.size() >= 6 ? object_scale(object) : std::nan("");
  all_ = AppearanceSums{}, interior_ = AppearanceSums{};
  PointCounts counts;
  observe_points(pair, object, counts);
  const int reference_count = static_cast<int>(object.points.size());
  sample.visible_fraction = static_cast<float>(counts.visible) / std::max(1, reference_count);
  // Interior points see no background in their window; their sums are used
  // when there are enough.
  const bool interior_only = interior_.count >= std::max(8, counts.tracked / 3);
  AppearanceSums& s = interior_only ? interior_ : all_;
  const bool measurable = counts.tracked >= std::max(3, reference_count / 10) && s.count > 0;
  // Drift is read only while the object is followed well (`seen_well`).
  const int inside_count = reference_count - counts.outside;
  // An object with most of its points already out of the frame is read on
  // a sliver at the edge, whose windows and histograms are cut by the frame
  // (a walker leaving the hand-held pool scene read structure 0.65 on its
  // last fifth, drift 1.09): it needs half of its points in view.
  const bool mostly_in_view = inside_count * 2 >= reference_count;
  const bool reads = !object.unreliable && measurable && mostly_in_view &&
                    seen_well(counts, inside_count) && looks_like_itself(counts);
  // Before confirm_support, which may drop points (observed_ indexes them).
  if (reads) sum_structure(object, interior_only, s);
  confirm_support(pair, object);
  sample.box = counts.box;
  ObjectLook look;
  if (reads) {
    look.measured = true;
    const double n = s.count;
    const color::Lab pred{s.pred[0] / n, s.pred[1] / n, s.pred[2] / n};
    const color::Lab now{s.now[0] / n, s.now[1] / n, s.now[2] / n};
    look.colour_de00 = color::ciede2000(pred, now);
    // Moving objects only: the static scene's cells carry the global
    // illumination fit already, and freeing their brightness as well let a
    // fade to black read as a hue change (a field scene fading out, ΔE00 10
    // with the brightness removed, docs/drift.md).
    if (object.kind == ObjectKind::moving) look.own_colour_de00 = hue_change_de00(pred, now);
    look.colour_now = cv::Vec3f(static_cast<float>(now.l), static_cast<float>(now.a),
                                static_cast<float>(now.b));
    look.colour_ref = cv::Vec3f(static_cast<float>(pred.l), static_cast<float>(pred.a),
                                static_cast<float>(pred.b));
  }
  if (reads) {
    sample.color_de00 = static_cast<float>(look.colour_de00);
    sample.own_colour_de00 = static_cast<float>(look.own_colour_de00);
    sample.colour_now = look.colour_now;
    sample.colour_ref = look.colour_ref;
    sample.structure = structure_departure(s.ref_hist, s.cur_hist, s.ref_mass, contrast_gain_);
    // Size: the object's own scale against the camera's local scale at the
    // object, so a zoom or dolly is not size drift. Needs most of its points
    // followed (a partial point set of an articulated figure reads limbs,
    // not size); otherwise the last value holds.
    float size_pct = last_size_pct(object);
    if (std::isfinite(scale) && counts.tracked >= std::max(6, reference_count * 6 / 10)) {
      const cv::Matx33d camera = camera_path_cur_ * object.camera_at_reference.inv();
      const double camera_scale = std::max(1e-3, local_scale(camera, object.ref_centroid));
      size_pct = static_cast<float>(100.0 * (scale / camera_scale - 1.0));
    }
    sample.size_pct = std::isfinite(size_pct) ? size_pct : 0.f;
    sample.size_window_pct = size_change_over_window(object, sample);
    const double size_log = std::abs(std::log1p(sample.size_window_pct / 100.0));
    const double size = std::min(size_log / params_.size_unit_log, params_.size_cap);
    const double own_colour =
        std::isfinite(sample.own_colour_de00) ? sample.own_colour_de00 / params_.own_colour_unit_de00 : 0.0;
    const double full_colour = sample.color_de00 / params_.colour_unit_de00;
    const double colour = object.kind == ObjectKind::moving ? std::min(full_colour, params_.moving_colour_cap)
                                                            : full_colour;
    if (object.kind == ObjectKind::scene) sample.quarter_colour_de00 = read_quarters(pair, object, s);
    const double quarter_colour = std::isfinite(sample.quarter_colour_de00)
                                      ? sample.quarter_colour_de00 / params_.own_colour_unit_de00
                                      : 0.0;
    const double structure = sample.structure / params_.structure_unit;
    sample.drift = static_cast<float>(std::max({colour, own_colour, quarter_colour, structure, size}));
    sample.aspect = sample.drift == static_cast<float>(own_colour)       ? DriftAspect::own_colour
                    : sample.drift == static_cast<float>(quarter_colour) ? DriftAspect::quarter_colour
                    : sample.drift == static_cast<float>(colour)    ? DriftAspect::colour
                    : sample.drift == static_cast<float>(structure) ? DriftAspect::structure
                                                                    : DriftAspect::size;
    if (breaks_continuity(object, sample)) {
      object.unreliable = true;
      object.unreliable_since_s = sample.t_s;
      sample = ObjectSample{sample.frame, sample.t_s, sample.box};
      sample.visible_fraction = static_cast<float>(counts.visible) / std::max(1, reference_count);
    }
  }
  decide_state(pair, object, counts);
  return sample;
}



}  // namespace clipwarden::drift
