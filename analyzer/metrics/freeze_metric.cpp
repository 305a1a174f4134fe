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
#include <algorithm>

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

  // warp_error finishes before freeze (registry order), so its series is
  // complete here.
  void finish(Report& report) override {
    MetricSeries* freeze = report.find_series("freeze");
    const MetricSeries* change = report.find_series("warp_error");
    if (!freeze || !change || change->values.size() != freeze->values.size() ||
        report.frame_times_s.size() != freeze->values.size())
      return;
    std::vector<double>& f = freeze->values;
    for (size_t start = 0; start < f.size();) {
      if (f[start] != 1.0) {
        ++start;
        continue;
      }
      size_t end = start;
      while (end < f.size() && f[end] == 1.0) ++end;
      if (!stops(change->values, report.frame_times_s, start, end))
        std::fill(f.begin() + static_cast<std::ptrdiff_t>(start),
                  f.begin() + static_cast<std::ptrdiff_t>(end), 0.0);
      start = end;
    }
  }

 private:
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
