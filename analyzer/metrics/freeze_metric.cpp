// freeze: 1 when frame t repeats frame t-1 (same_picture, image_error.h),
// else 0. Repeats that the clip's own cadence explains (a GIF storing every
// picture 3 times) never reach the metric: the pipeline leaves them out
// (analyzer/pipeline/cadence_filter.h), so what stays still here is motion
// that stopped against the clip's cadence. The freeze test checks agreement
// with FFmpeg's freezedetect.
//
// A run of repeats is a freeze only when the picture stops: the change just
// before it (warp_error over the 0.5 s before the run, or after it when the
// run opens the clip) must be more than kStopContrast times the change
// inside it. A near-still scene filmed by a still camera (a person standing
// and drinking, far off) differs between frames by less than the repeat
// test's -60 dB, and stays that way: compression noise, not a stop. Such a
// run is cleared to 0. An exact repeat changes by 0, so it always stops.
//
// A held picture that then fades to black is an edited freeze-frame ending
// (an editor's freeze and fade-out, e.g. FFmpeg's `tpad=stop_mode=clone`
// then `fade=t=out`): every frame after the hold shows the held picture
// times one falling gain, and nothing moves again. The clip ends there, or
// a new shot begins from black; no stalled motion is ever seen. Such a
// hold is cleared to 0 and told in report.notes instead. A hold in the
// middle of a shot, or one after which the scene fades while it moves,
// stays a freeze.
#include <algorithm>
#include <cstdio>
#include <optional>
#include <string>

#include "analyzer/frame/series_math.h"
#include "analyzer/metrics/image_error.h"
#include "analyzer/metrics/metric.h"

namespace clipwarden {

// One rule per two lines reads as a table, so the formatter keeps out.
// clang-format off
const MetricDescriptor& freeze_descriptor() {
  static const MetricDescriptor d{
      .name = "freeze",
      .citation = "our own, with the -60 dB noise floor of FFmpeg's freezedetect filter",
      .columns = {
          {.name = "freeze",
           .unit = "flag: 1 repeated, 0 not",
           .description = "The frame repeats the previous one, after the picture was changing: motion "
                          "that stops.",
           .better = Better::lower,
           .frame_rate = FrameRateDependence::none,
           .frame_rate_text = "per frame; the policy judges a frozen stretch in seconds",
           // Frame-rate conversion repeats isolated frames (24->30 fps
           // pulldown repeats one frame in five: mean 0.2, runs of 1), so a
           // run must be 2+ frames and runs are never merged (merging would
           // join pulldown repeats into one long false freeze). The baseline
           // is off: on a 0/1 series the median is meaningless. Peaks carry
           // no severity (every run peaks at 1); the verdict comes from how
           // long the picture stands still, in seconds so it does not depend
           // on the frame rate.
           .default_rule = {
               SegmentRule{.enter = 0.5, .leave = 0.5, .min_frames = 2, .merge_gap_frames = 0,
                           .baseline_k = 0, .review_peak = kNever, .reject_peak = kNever},
               {// 0.3 s still is a visible hitch; a full second is a stall.
                {"longest_segment_s", 0.3, 1.0},
                // Above pulldown's 0.2: a third of frames repeated looks
                // choppy, over half is a slideshow.
                {"mean", 0.3, 0.6}}},
           .catches = {"freeze"}},
      }};
  return d;
}
// clang-format on

namespace {

class FreezeMetric final : public Metric {
 public:
  const MetricDescriptor& descriptor() const override { return freeze_descriptor(); }
  void measure_pair(const FramePair& pair, std::span<double> out) const override {
    out[0] = same_picture(pair.cur->gray, pair.prev->gray) ? 1.0 : 0.0;
  }

  // Follows each hold into what comes after it. The per-pair work (a gain
  // fit against the held picture) runs only on the frames right after a
  // hold while they keep showing it dimmed, so a clip without holds pays
  // nothing here.
  bool needs_in_order() const override { return true; }
  void observe_in_order(const FramePair& pair, std::span<double> out) override {
    const bool repeat = out[0] == 1.0;
    if (state_ == State::fading) {
      const std::optional<double> gain = dimmed_copy_gain(held_, pair.cur->gray);
      if (gain && *gain <= kMaxFadeGain) {
        ending_.last_s = pair.cur->t_s;
        ending_.black = ending_.black || *gain <= kBlackGain;
        return;
      }
      close_fade();
    } else if (state_ == State::holding && !repeat) {
      const std::optional<double> gain = dimmed_copy_gain(held_, pair.cur->gray);
      state_ = gain && *gain <= kMaxFadeGain ? State::fading : State::idle;
      ending_.last_s = pair.cur->t_s;
      ending_.black = gain && *gain <= kBlackGain;
      return;
    }
    if (repeat && state_ == State::idle) {
      pair.prev->gray.copyTo(held_);
      ending_ = {.first_s = pair.cur->t_s};
      state_ = State::holding;
    }
  }

  // warp_error finishes before freeze (registry order), so its series is
  // complete here.
  void finish(Report& report) override {
    if (state_ == State::fading) close_fade();
    MetricSeries* freeze = report.find_series("freeze");
    const MetricSeries* change = report.find_series("warp_error");
    if (!freeze || report.frame_times_s.size() != freeze->values.size()) return;
    std::vector<double>& f = freeze->values;
    for (size_t start = 0; start < f.size();) {
      if (f[start] != 1.0) {
        ++start;
        continue;
      }
      size_t end = start;
      while (end < f.size() && f[end] == 1.0) ++end;
      FadedHold* faded = faded_hold_at(report.frame_times_s[start]);
      const bool still_scene = change && change->values.size() == f.size() &&
                               !stops(change->values, report.frame_times_s, start, end);
      if (faded || still_scene)
        std::fill(f.begin() + static_cast<std::ptrdiff_t>(start),
                  f.begin() + static_cast<std::ptrdiff_t>(end), 0.0);
      if (faded && !faded->told) {
        report.notes.push_back(faded_hold_note(report.frame_times_s, start - 1, faded->last_s));
        faded->told = true;
      }
      start = end;
    }
  }

 private:
  // A hold followed by a fade of the held picture: times of the hold's first
  // repeated frame and of the fade's last frame.
  struct FadedHold {
    double first_s = 0, last_s = 0;
    bool black = false;  // the fade reached kBlackGain
    bool told = false;   // its note is written
  };
  enum class State { idle, holding, fading };

  // A fade dims: a gain a little above 1 is the fit's noise on the fade's
  // first frames, more is a picture that brightens. It ends in black when
  // the gain falls to 0.1 (the held picture's mean of 182 codes on the
  // plane clip shows as 18: a dark frame, where the picture is gone).
  static constexpr double kMaxFadeGain = 1.02;
  static constexpr double kBlackGain = 0.1;

  void close_fade() {
    if (ending_.black) faded_holds_.push_back(ending_);
    state_ = State::idle;
  }

  // The faded hold that frame time t lies in (a hold may be broken into
  // runs by a frame of compression noise between them).
  FadedHold* faded_hold_at(double t) {
    for (FadedHold& h : faded_holds_)
      if (t >= h.first_s - 1e-9 && t <= h.last_s + 1e-9) return &h;
    return nullptr;
  }

  // What a reviewer reads instead of a freeze: where the picture is held
  // and where it is faded out. `held` is the frame the hold repeats.
  static std::string faded_hold_note(const std::vector<double>& times, size_t held, double last_s) {
    size_t last = held;
    while (last + 1 < times.size() && times[last + 1] <= last_s + 1e-9) ++last;
    char text[320];
    std::snprintf(text, sizeof text,
                  "Frames %zu-%zu (%.2f-%.2f s) show one picture: held still, then faded to black. "
                  "An edited freeze-frame ending, not counted as a freeze.",
                  held, last, times[held], times[last]);
    return text;
  }

  State state_ = State::idle;
  cv::Mat held_;
  FadedHold ending_;
  std::vector<FadedHold> faded_holds_;

  // Measured on the corpus's camera clips (2026-12-04): in near-still
  // scenes the median change of the half second before a run of repeats is
  // 0.7-2.3x that inside it (compression noise varies that much); where
  // hand-held footage stops it is 12-65x, and an exact repeat changes by 0.
  static constexpr double kStopContrast = 4;
  static constexpr double kContextSeconds = 0.5;

  // Whether frames [start, end) stop against the change around them.
  static bool stops(const std::vector<double>& change, const std::vector<double>& times,
                    size_t start, size_t end) {
    const double inside =
        quantile(defined_values(std::span<const double>(change).subspan(start, end - start)), 0.5);
    std::vector<double> around;
    for (size_t j = start; j-- > 0 && times[start] - times[j] <= kContextSeconds + 1e-9;)
      if (is_defined(change[j])) around.push_back(change[j]);
    if (around.empty())  // the run opens the clip: the half second after it
      for (size_t j = end; j < change.size() && times[j] - times[end - 1] <= kContextSeconds + 1e-9;
           ++j)
        if (is_defined(change[j])) around.push_back(change[j]);
    // Nothing to compare with (a clip that never moves, a run between
    // cuts): the repeat test alone decides, as before.
    if (around.empty() || !is_defined(inside)) return true;
    return quantile(around, 0.5) > kStopContrast * inside;
  }
};

}  // namespace

std::unique_ptr<Metric> make_freeze_metric(const AnalysisSettings&) {
  return std::make_unique<FreezeMetric>();
}

}  // namespace clipwarden
