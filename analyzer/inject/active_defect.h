// One defect while a clip streams through the injector: which frames it
// covers, what it does to a frame's pixels, and what the truth file says
// about it afterwards.
#pragma once

#include <cstdint>
#include <optional>

#include <nlohmann/json.hpp>
#include <opencv2/core.hpp>

#include "analyzer/inject/defect_spec.h"
#include "analyzer/inject/frame_effects.h"
#include "analyzer/inject/region_tracker.h"

namespace clipwarden::inject {

// What a defect may look at for the current frame.
struct FrameContext {
  int64_t input_index = 0;
  double t_s = 0;
  const cv::Mat* clean = nullptr;  // the clean input frame
  MotionField* motion = nullptr;   // flow from the previous clean frame (none for frame 0)
  double nominal_fps = 25;
  int64_t estimated_frames = 0;  // the container's estimate of the input length
};

class ActiveDefect {
 public:
  // `seed` and `index` give the defect its own random stream, so adding a
  // defect never changes the choices of the others.
  ActiveDefect(DefectSpec spec, uint64_t seed, int index);

  const DefectSpec& spec() const { return spec_; }
  DefectClass cls() const { return spec_.cls; }

  // True when the frame lies in the defect's range. Call once per input
  // frame, in order.
  bool covers(int64_t input_index, double t_s);

  // Draws the defect into `frame` (classes that change pixels: everything
  // but freeze, drop and cut). Call only for covered frames.
  void apply(cv::Mat& frame, const FrameContext& ctx);

  // Notes that covered input frame became output frame `output_index` at
  // t_s (for drop: the first frame after the gap).
  void record_output(int64_t output_index, double t_s);
  bool recorded() const { return first_output_ >= 0; }
  int64_t covered_frames() const { return covered_; }
  int64_t first_input() const { return first_input_; }  // -1 until covered

  // Adds a fact to the truth entry's details (e.g. where a cut came from).
  void note(const std::string& key, nlohmann::json value) { details_[key] = std::move(value); }

  // The defect's entry in the truth file.
  nlohmann::json truth() const;

 private:
  double progress(const FrameContext& ctx) const;  // (k+1)/n over the range, for ramps
  double pulse(const FrameContext& ctx) const;     // +1 / -1 (square) or sin, by time
  void place_region(const FrameContext& ctx);
  void apply_region(cv::Mat& frame, const FrameContext& ctx);
  void apply_colour_drift(cv::Mat& frame, const FrameContext& ctx, const SoftMask& mask);
  void apply_strobe(cv::Mat& frame, const FrameContext& ctx);

  DefectSpec spec_;
  cv::RNG rng_;
  double strength_ = 0;
  int64_t covered_ = 0;  // covered input frames so far
  int64_t first_input_ = -1;
  double first_t_s_ = 0;
  mutable std::optional<int64_t> ramp_frames_;
  bool single_taken_ = false;

  std::optional<cv::Rect2d> box_;  // current region, pixels
  cv::Rect2d first_box_;
  cv::Vec2d chroma_direction_{0, 0};
  cv::Point2d jerk_shift_{0, 0};
  nlohmann::json region_track_ = nlohmann::json::array();
  nlohmann::json details_ = nlohmann::json::object();
  double strobe_min_delta_y_ = 1e9;

  int64_t first_output_ = -1, last_output_ = -1;
  double first_output_t_ = 0, last_output_t_ = 0;
};

}  // namespace clipwarden::inject
