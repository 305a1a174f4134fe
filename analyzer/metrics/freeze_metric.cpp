// freeze: 1 when frame t repeats frame t-1 (same_picture, image_error.h),
// else 0. Repeats that the clip's own cadence explains (a GIF storing every
// picture 3 times) never reach the metric: the pipeline leaves them out
// (analyzer/pipeline/cadence_filter.h), so what stays still here is motion
// that stopped against the clip's cadence. The freeze test checks agreement
// with FFmpeg's freezedetect.
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
           .description = "The frame repeats the previous one.",
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
};

}  // namespace

std::unique_ptr<Metric> make_freeze_metric(const AnalysisSettings&) { return std::make_unique<FreezeMetric>(); }

}  // namespace clipwarden
