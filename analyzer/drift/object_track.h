// The state of one followed object: its material points (each with the
// appearance it had when first seen), its fitted motion, and its history of
// drift measurements.
#pragma once

#include <array>
#include <cstdint>
#include <limits>
#include <string>
#include <vector>

#include <opencv2/core.hpp>

#include "analyzer/drift/frame_features.h"
#include "analyzer/drift/similarity_fit.h"
#include "clipwarden/report.h"

namespace clipwarden::drift {

enum class PointState : uint8_t {
  tracked,   // followed by the flow, forward-backward consistent
  occluded,  // lost its flow chain; position predicted by the object's motion
  outside,   // left the frame
};

struct TrackPoint {
  cv::Point2f pos;      // current position (working pixels)
  cv::Point2f ref_pos;  // position in the object's reference frame
  // Reference colour, encoded sRGB (B, G, R) in [0,1], expressed in the
  // illumination of the shot's first frame (see IlluminationMap::invert).
  cv::Vec3f ref_rgb;
  float ref_gray = 0;  // window-mean gray level at reference, for re-anchoring
  float ref_slope = 0;  // gray-level gradient magnitude at reference, per pixel, in [0,1] units
  float ref_mass = 0;  // total gradient magnitude of the reference window
  OrientationHistogram ref_hist{};
  PointState state = PointState::tracked;
  bool interior = false;  // all four grid neighbours belong to the object too
  bool present = true;  // appearance still matches the reference
  uint8_t quarter = 0;  // scene cells: which quarter of the cell (by reference position) it lies in
  // During a new object's probation: how far its flow steps fell from the
  // object's own motion and from the camera's (summed, pixels).
  cv::Point2f flow_step;
  float own_motion_error = 0, camera_motion_error = 0;
};

// The report's kinds (a moving region, or a cell carried with the camera).
using ObjectKind = TrackedKind;

inline constexpr float kNotMeasured = std::numeric_limits<float>::quiet_NaN();

// The reading behind a drift value (the largest of the four in drift units).
enum class DriftAspect : uint8_t { none, colour, own_colour, quarter_colour, structure, size };

// The report's name of an aspect ("color", "own_color", "quarter_color",
// "structure", "size"),
// spelled as the report's per-look columns are; "" for none.
const char* report_name(DriftAspect aspect);

// One frame of an object's life. Drift values are NaN when the object was
// not measurable (occluded).
struct ObjectSample {
  int64_t frame = 0;
  double t_s = 0;
  cv::Rect2f box;
  float drift = kNotMeasured;
  float color_de00 = kNotMeasured;
  // CIEDE2000 of the mean colour once the object's own brightness change is
  // taken out (see hue_change_de00 in object_update.cpp): shade, a turn
  // toward the light or exposure leave it near 0, a repaint does not.
  float own_colour_de00 = kNotMeasured;
  float structure = kNotMeasured;
  float size_pct = kNotMeasured;         // scale against the first look, camera removed
  float size_window_pct = kNotMeasured;  // scale change over the size window
  // Scene cells: the largest own colour change of a quarter of the cell
  // beyond that quarter's clean level (see read_quarters, object_update.cpp).
  float quarter_colour_de00 = kNotMeasured;
  float visible_fraction = 0;  // share of its reference points seen now
  // Which of the readings above gave `drift` (the largest in drift units):
  // the report says whether an object changed colour, markings or size.
  DriftAspect aspect = DriftAspect::none;
  cv::Vec3f colour_now, colour_ref;  // mean CIELAB (L*, a*, b*) now and of the reference
};

struct ObjectTrack {
  int id = 0;
  ObjectKind kind = ObjectKind::moving;
  int64_t first_frame = 0, last_frame = 0;
  int64_t last_seen_frame = 0;  // last frame with enough visible support
  double first_t_s = 0;
  bool confirmed = false;  // its support was checked once after a short probation
  bool unreliable = false;  // a tracking break was seen: no longer measured
  double unreliable_since_s = 0;
  cv::Matx33d camera_at_reference = cv::Matx33d::eye();  // shot camera path at first frame
  cv::Point2f ref_centroid;
  float ref_extent_px = 0;  // larger side of the reference box
  std::vector<TrackPoint> points;
  // Scene cells: each quarter's own colour change while the cell is young
  // (its clean level, the largest reading over its first look; read_quarters).
  std::array<float, 4> quarter_clean_de00{};
  Similarity motion;                 // reference positions -> current positions
  cv::Point2f centroid_velocity_px_s;  // for coasting through full occlusion
  double missing_s = 0;   // support gone without occlusion, consecutive
  double occluded_s = 0;  // support hidden by something in front, consecutive
  bool ended = false;
  bool vanished = false;
  std::string end_reason;
  std::vector<ObjectSample> history;
};

}  // namespace clipwarden::drift
