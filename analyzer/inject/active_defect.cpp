#include "analyzer/inject/active_defect.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include "analyzer/color/relative_luminance.h"

namespace clipwarden::inject {
namespace {

constexpr double kTimeEpsilon_s = 1e-6;

double mean_luminance(const cv::Mat& bgr) {
  cv::Mat y;
  relative_luminance(bgr, y);
  return cv::mean(y)[0];
}

double round1(double v) { return std::round(v * 10) / 10; }
double round3(double v) { return std::round(v * 1000) / 1000; }

// Mixes the user's seed and the defect's position into one RNG state
// (splitmix64 finaliser, a common practice for deriving seeds).
uint64_t mix_seed(uint64_t seed, int index) {
  uint64_t z = seed + 0x9e3779b97f4a7c15ULL * static_cast<uint64_t>(index + 1);
  z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
  z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
  return (z ^ (z >> 31)) | 1;  // cv::RNG treats 0 specially
}

}  // namespace

ActiveDefect::ActiveDefect(DefectSpec spec, uint64_t seed, int index)
    : spec_(std::move(spec)), rng_(mix_seed(seed, index)), strength_(spec_.strength_value()) {}

bool ActiveDefect::covers(int64_t input_index, double t_s) {
  const SpecRange& r = spec_.range;
  bool inside = false;
  if (!r.in_seconds) {
    inside = input_index >= static_cast<int64_t>(r.start) &&
             (!r.end || input_index <= static_cast<int64_t>(*r.end));
  } else if (r.single_frame) {
    inside = !single_taken_ && t_s >= r.start - kTimeEpsilon_s;
    single_taken_ = single_taken_ || inside;
  } else {
    inside = t_s >= r.start - kTimeEpsilon_s && (!r.end || t_s < *r.end - kTimeEpsilon_s);
  }
  if (inside) {
    if (first_input_ < 0) {
      first_input_ = input_index;
      first_t_s_ = t_s;
    }
    ++covered_;
  }
  return inside;
}

double ActiveDefect::progress(const FrameContext& ctx) const {
  if (!ramp_frames_) {
    const SpecRange& r = spec_.range;
    int64_t n = 1;
    if (r.single_frame) n = 1;
    else if (r.end && !r.in_seconds) n = static_cast<int64_t>(*r.end) - static_cast<int64_t>(r.start) + 1;
    else if (r.end) n = std::llround((*r.end - r.start) * ctx.nominal_fps);
    else n = ctx.estimated_frames - first_input_;
    ramp_frames_ = std::max<int64_t>(1, n);
  }
  return std::min(1.0, static_cast<double>(covered_) / static_cast<double>(*ramp_frames_));
}

double ActiveDefect::pulse(const FrameContext& ctx) const {
  const double hz = spec_.hz > 0 ? spec_.hz : default_pulse_hz(spec_.cls);
  if (hz >= ctx.nominal_fps / 2) return (covered_ - 1) % 2 == 0 ? 1.0 : -1.0;  // every other frame
  // Time since the first frame, snapped to the frame grid when it sits on
  // it: containers round timestamps (Matroska to 1 ms), and a phase that is
  // a whole number in exact arithmetic (3 Hz at 12 fps) must not land just
  // below it.
  double elapsed_frames = (ctx.t_s - first_t_s_) * ctx.nominal_fps;
  if (std::fabs(elapsed_frames - std::round(elapsed_frames)) < 0.05) elapsed_frames = std::round(elapsed_frames);
  const double phase = hz * elapsed_frames / ctx.nominal_fps + 1e-9;
  if (spec_.sine) return std::sin(2 * CV_PI * phase);
  return phase - std::floor(phase) < 0.5 ? 1.0 : -1.0;
}

void ActiveDefect::place_region(const FrameContext& ctx) {
  const cv::Mat& clean = *ctx.clean;
  if (!box_) {
    if (spec_.region) {
      const NormalizedRegion& n = *spec_.region;
      box_ = cv::Rect2d(n.x * clean.cols, n.y * clean.rows, n.w * clean.cols, n.h * clean.rows);
    } else {
      const bool prefer_motion = spec_.cls == DefectClass::colour_drift || spec_.cls == DefectClass::shape_drift ||
                                 spec_.cls == DefectClass::vanish;
      const cv::Size2d size(spec_.region_size * clean.cols, spec_.region_size * clean.rows);
      box_ = choose_region(clean, *ctx.motion, size, prefer_motion && ctx.motion->has_pair(), rng_);
    }
    first_box_ = *box_;
  } else if (spec_.track && ctx.motion->has_pair()) {
    const cv::Point2d moved = ctx.motion->median_motion(*box_);
    box_->x += moved.x;
    box_->y += moved.y;
  }
}

void ActiveDefect::apply(cv::Mat& frame, const FrameContext& ctx) {
  switch (spec_.cls) {
    case DefectClass::flicker:
      scale_linear_light(frame, 1.0 + strength_ * pulse(ctx), whole_frame(frame.size()));
      break;
    case DefectClass::strobe: apply_strobe(frame, ctx); break;
    case DefectClass::jerk: {
      if (covered_ == 1) {
        const double angle = spec_.direction_deg ? *spec_.direction_deg * CV_PI / 180 : rng_.uniform(0.0, 2 * CV_PI);
        const double length = strength_ * std::max(frame.cols, frame.rows);
        jerk_shift_ = {length * std::cos(angle), length * std::sin(angle)};
        details_["shift_px"] = {round1(jerk_shift_.x), round1(jerk_shift_.y)};
      }
      displace(frame, jerk_shift_);
      break;
    }
    case DefectClass::local_flicker:
    case DefectClass::boiling:
    case DefectClass::colour_drift:
    case DefectClass::shape_drift:
    case DefectClass::vanish: apply_region(frame, ctx); break;
    case DefectClass::freeze:
    case DefectClass::drop:
    case DefectClass::cut: break;  // the injector replaces or removes these frames
  }
}

void ActiveDefect::apply_region(cv::Mat& frame, const FrameContext& ctx) {
  place_region(ctx);
  const cv::Rect2d box = *box_;
  region_track_.push_back({-1, round1(box.x), round1(box.y), round1(box.width), round1(box.height)});
  const SoftMask mask = feathered_ellipse(frame.size(), box);
  if (mask.roi.empty()) return;  // the tracked content has left the frame
  switch (spec_.cls) {
    case DefectClass::local_flicker: scale_linear_light(frame, 1.0 + strength_ * pulse(ctx), mask); break;
    case DefectClass::boiling: {
      const double grain = spec_.grain_px > 0 ? spec_.grain_px : std::max(1.0, 0.01 * std::max(frame.cols, frame.rows));
      add_noise(frame, smooth_noise_field(mask.roi.size(), grain, rng_), strength_, mask);
      break;
    }
    case DefectClass::colour_drift: apply_colour_drift(frame, ctx, mask); break;
    case DefectClass::shape_drift: {
      const double scale = 1.0 + strength_ * progress(ctx);
      scale_about(frame, {box.x + box.width / 2, box.y + box.height / 2}, scale, mask);
      details_["scale_last"] = round3(scale);
      break;
    }
    case DefectClass::vanish: {
      const double amount = std::min(1.0, strength_ * progress(ctx));
      fade_into_surroundings(frame, mask, amount);
      details_["amount_last"] = round3(amount);
      break;
    }
    default: break;
  }
}

void ActiveDefect::apply_colour_drift(cv::Mat& frame, const FrameContext& ctx, const SoftMask& mask) {
  const cv::Vec3d clean_lab = mean_lab(*ctx.clean, mask);
  if (covered_ == 1) {
    // A hue rotation moves the colour perpendicular to its chroma vector; a
    // nearly grey region has no hue, so it gets a tint in a seeded direction.
    const double chroma = std::hypot(clean_lab[1], clean_lab[2]);
    if (chroma > 5) {
      const double sign = rng_.uniform(0, 2) == 0 ? 1.0 : -1.0;
      chroma_direction_ = {-sign * clean_lab[2] / chroma, sign * clean_lab[1] / chroma};
    } else {
      const double angle = rng_.uniform(0.0, 2 * CV_PI);
      chroma_direction_ = {std::cos(angle), std::sin(angle)};
    }
    details_["chroma_direction_ab"] = {round3(chroma_direction_[0]), round3(chroma_direction_[1])};
  }
  const double target = strength_ * progress(ctx);
  const double m = chroma_shift_for_de(clean_lab, chroma_direction_, target);
  shift_chroma(frame, m * chroma_direction_, mask);
  // What the viewer gets after 8-bit rounding and gamut clipping.
  details_["de2000_last"] =
      round3(color::ciede2000(as_lab(clean_lab), as_lab(mean_lab(frame, mask))));
}

void ActiveDefect::apply_strobe(cv::Mat& frame, const FrameContext& ctx) {
  if (pulse(ctx) <= 0) return;  // the dark state is the frame as it is
  const double y = mean_luminance(frame);
  if (y >= 1.0) return;
  const double alpha = std::min(1.0, strength_ / (1.0 - y));
  blend_toward_white(frame, alpha);
  strobe_min_delta_y_ = std::min(strobe_min_delta_y_, mean_luminance(frame) - y);
  details_["min_delta_luminance"] = round3(strobe_min_delta_y_);
}

void ActiveDefect::record_output(int64_t output_index, double t_s) {
  if (first_output_ < 0) {
    first_output_ = output_index;
    first_output_t_ = t_s;
  }
  last_output_ = output_index;
  last_output_t_ = t_s;
  // Region boxes were noted before the output index was known.
  for (auto& entry : region_track_)
    if (entry[0] == -1) entry[0] = output_index;
}

nlohmann::json ActiveDefect::truth() const {
  nlohmann::json j;
  j["class"] = to_string(spec_.cls);
  j["spec"] = spec_.text;
  j["frames"] = {first_output_, last_output_};
  j["times_s"] = {first_output_t_, last_output_t_};
  j["input_frames"] = {first_input_, first_input_ + covered_ - 1};
  if (strength_is_range_length(spec_.cls))
    j["strength"] = static_cast<double>(covered_);
  else if (spec_.cls == DefectClass::cut && !spec_.source_path.empty())
    j["strength"] = nullptr;  // frames from another clip: no distance in time
  else
    j["strength"] = strength_;
  j["strength_unit"] = strength_unit(spec_.cls);
  j["level"] = spec_.level ? nlohmann::json(to_string(*spec_.level)) : nlohmann::json(nullptr);
  if (box_)
    j["region"] = {{"x", round1(first_box_.x)}, {"y", round1(first_box_.y)}, {"w", round1(first_box_.width)},
                   {"h", round1(first_box_.height)}};
  else
    j["region"] = nullptr;
  j["region_track"] = region_track_;
  j["details"] = details_;
  return j;
}

}  // namespace clipwarden::inject
