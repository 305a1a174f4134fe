// What becomes of an object: the probation of a new one, the continuity of
// its measurements, and whether it is seen, hidden, gone, out of the frame
// or no longer trustworthy (drift_tracker.h).
#include <algorithm>
#include <cmath>

#include "analyzer/color/ciede2000.h"
#include "analyzer/drift/drift_tracker.h"

namespace clipwarden::drift {

// A moving region found by its motion in one frame pair carries a fringe of
// background: flow is smeared across the object's edge, so background next
// to its leading edge seems to move with it. After a short probation the
// points that do not look like their reference any more (they now show the
// object, not the background they started on) leave the object for good.
void DriftTracker::confirm_support(const FramePair& pair, ObjectTrack& object) {
  if (object.confirmed || pair.cur->t_s - object.first_t_s < params_.probation_s) return;
  object.confirmed = true;
  // Kept: followed, looking like its reference, and moving with the object
  // rather than with the camera over the probation.
  const auto keeps = [](const TrackPoint& p) {
    return p.state == PointState::tracked && p.present &&
           p.own_motion_error < p.camera_motion_error;
  };
  const auto kept = std::count_if(object.points.begin(), object.points.end(), keeps);
  if (kept < std::max<std::ptrdiff_t>(params_.min_mover_points, object.points.size() * 3 / 10))
    return;
  std::erase_if(object.points, [&](const TrackPoint& p) { return !keeps(p); });
  cv::Point2f sum(0, 0);
  cv::Rect2f box(object.points.front().ref_pos, cv::Size2f(0, 0));
  for (const auto& p : object.points) {
    sum += p.ref_pos;
    box |= cv::Rect2f(p.ref_pos, cv::Size2f(1, 1));
  }
  object.ref_centroid = sum * (1.0f / static_cast<float>(object.points.size()));
  object.ref_extent_px = std::max(box.width, box.height);
  mark_interior_points(object.points, params_.object_step_px);
}

// Drift is a gradual departure; a tracking break (points handed over to
// another object in a crossing, or slid off behind an occluder) is a jump.
// A reading is a jump when it differs from the last measured reading by
// more than 8 CIEDE2000 in colour, 20% in size or 0.25 in structure beyond
// what the object's own recent trend predicts. From then on the object is
// not measured (an abrupt change of the picture is the warp-error metric's
// to flag).
//
// The comparison is with the last reading, not with one half a second
// back: a steady departure — a hue that turns by 30 degrees a second,
// ΔE00 ~15 per second on a saturated surface — moves by well under a
// ΔE00 per frame however fast it goes over seconds, and its onset (a change
// of rate) is not a jump. The trend is the slope between the last reading
// and the reading a window (0.5 s) before it; it carries the expectation
// across a stretch the object was not measured in, for at most one window.
bool DriftTracker::breaks_continuity(const ObjectTrack& object, const ObjectSample& now) const {
  if (!object.confirmed) return false;  // the probation settles the point set first
  const double window = params_.continuity_window_s;
  const ObjectSample* prior = nullptr;
  const ObjectSample* older = nullptr;
  for (auto it = object.history.rbegin(); it != object.history.rend(); ++it) {
    if (!std::isfinite(it->drift)) continue;
    if (!prior) {
      prior = &*it;
      continue;
    }
    older = &*it;
    if (prior->t_s - it->t_s >= window) break;
  }
  if (!prior) return false;
  // A trend needs a full window of history: a slope over a frame or two
  // would only amplify noise.
  if (older && prior->t_s - older->t_s < 0.99 * window) older = nullptr;
  const double ahead_s = std::min(now.t_s - prior->t_s, window);
  const double span_s = older ? prior->t_s - older->t_s : 0;
  const double trend = span_s > 1e-6 ? ahead_s / span_s : 0;
  // Colour as a departure from the reference (now - reference, CIELAB),
  // rebased on this frame's reference points (the visible subset may
  // differ); the expected departure continues the trend.
  const cv::Vec3f departed_then = prior->colour_now - prior->colour_ref;
  cv::Vec3f expected = departed_then;
  if (older)
    expected +=
        static_cast<float>(trend) * (departed_then - (older->colour_now - older->colour_ref));
  const cv::Vec3f then = now.colour_ref + expected;
  const double colour = color::ciede2000({now.colour_now[0], now.colour_now[1], now.colour_now[2]},
                                         {then[0], then[1], then[2]});
  auto extrapolated = [&](double prior_value, double older_value) {
    return older ? prior_value + trend * (prior_value - older_value) : prior_value;
  };
  const double size_log = std::log1p(now.size_pct / 100.0);
  const double size =
      std::abs(size_log - extrapolated(std::log1p(prior->size_pct / 100.0),
                                       older ? std::log1p(older->size_pct / 100.0) : 0));
  const double structure =
      std::abs(now.structure - extrapolated(prior->structure, older ? older->structure : 0));
  return colour > params_.max_colour_jump_de00 || size > params_.max_size_jump_log ||
         structure > params_.max_structure_jump;
}

// Size change over the last `size_window_s` (against the measured sample
// nearest that far back, or the first look for a younger object), in %.
// Size is read over a window, not against the first look: in real footage
// an object walking away from a static camera shrinks by a third over a
// few seconds by perspective alone (opencv-doc vtest.avi), while a size
// defect in a generated clip is a change within a second or two.
float DriftTracker::size_change_over_window(const ObjectTrack& object,
                                            const ObjectSample& now) const {
  const ObjectSample* then = nullptr;
  for (auto it = object.history.rbegin(); it != object.history.rend(); ++it) {
    if (!std::isfinite(it->size_pct)) continue;
    then = &*it;
    if (now.t_s - it->t_s >= params_.size_window_s) break;
  }
  if (!then) return now.size_pct;
  return static_cast<float>(100.0 *
                            ((1.0 + now.size_pct / 100.0) / (1.0 + then->size_pct / 100.0) - 1.0));
}

void DriftTracker::decide_state(const FramePair& pair, ObjectTrack& object,
                                const PointCounts& counts) {
  const int reference_count = static_cast<int>(object.points.size());
  const int inside_count = reference_count - counts.outside;
  if (counts.outside * 10 >= reference_count * 7) {
    object.ended = true;
    object.end_reason = "left_frame";
    object.last_frame = pair.cur->index;
    return;
  }
  // Seen: enough of its points are followed and they still show the
  // object's own pattern (for a flat object: roughly its own colour).
  const bool enough = counts.tracked >= std::max(3, inside_count / 5);
  if (object.unreliable && pair.cur->t_s - object.unreliable_since_s >= params_.unreliable_end_s) {
    object.ended = true;
    object.end_reason = "lost";
    object.last_frame = pair.cur->index;
    return;
  }
  if (enough && looks_like_itself(counts)) {
    object.missing_s = object.occluded_s = 0;
    object.last_seen_frame = pair.cur->index;
    return;
  }
  // Not seen. Behind another followed object, or behind something that was
  // visible before (the occlusion mask passes where it should be): occluded.
  // Followed but showing something else, or new content appears where it
  // was: it is gone.
  const bool gone = enough || counts.absent + counts.revealed > counts.covered;
  if (gone && !behind_other_object(object, counts.box)) {
    object.missing_s += pair.dt_s;
  } else {
    object.occluded_s += pair.dt_s;
  }
  if (object.missing_s >= params_.vanish_after_s) {
    object.ended = true;
    object.vanished = true;
    object.end_reason = "vanished";
    object.last_frame = object.last_seen_frame;
  } else if (object.missing_s + object.occluded_s >= params_.lost_after_s) {
    object.ended = true;
    object.end_reason = "lost";
    object.last_frame = object.last_seen_frame;
  }
}

bool DriftTracker::behind_other_object(const ObjectTrack& object, const cv::Rect2f& box) const {
  if (box.area() <= 0) return false;
  for (const auto& other : objects_) {
    if (&other == &object || other.ended || other.kind != ObjectKind::moving ||
        other.history.empty())
      continue;
    if ((other.history.back().box & box).area() > 0.3f * box.area()) return true;
  }
  return false;
}

// The object shows itself while most of its followed points show their own
// material (a faded-out or replaced object shows something else).
bool DriftTracker::looks_like_itself(const PointCounts& counts) const {
  return counts.tracked >= 3 && counts.visible * 2 >= counts.tracked;
}

// Drift is read only while the object is followed well. Normally that means
// at least 60% of its points in view are tracked and look like their
// reference (on opencv-doc vtest.avi the size readings of walking people
// swung by a quarter at 50% visibility); crossings, partial occlusion and a
// point set disturbed by an occluder fall below it, and tracking trouble
// must not read as drift. But a point looks like its reference by its gray
// level, and a recolour changes gray levels unevenly (the lantern demo
// clip's 110 degree hue turn left 55-58% of its points matching while the
// flow still followed every one of them, none hidden): when at least 90% of
// the points in view are still followed, nothing covers the object, and
// the gray mismatch is its own surface changing in place, which is what
// drift measures. `looks_like_itself` still asks half of them to match.
bool DriftTracker::seen_well(const PointCounts& counts, int inside_count) const {
  const bool most_match = counts.visible * 10 >= inside_count * 6;
  const bool all_followed = counts.tracked * 10 >= inside_count * 9;
  return most_match || all_followed;
}

}  // namespace clipwarden::drift
