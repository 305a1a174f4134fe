// warp_error: the warping error of Lai et al., "Learning Blind Video
// Temporal Consistency", ECCV 2018, eq. (8): over the non-occluded pixels M,
//   E = 1/|M| * sum_{x in M} || V_t(x) - W(V_{t-1})(x) ||_2^2
// with RGB in [0,1], so a pixel contributes the squared difference summed
// over its three channels. occluded_pct is 100 * |not M| / |all pixels|.
#include "analyzer/metrics/image_error.h"
#include "analyzer/metrics/metric.h"
#include "analyzer/frame/shot_boundaries.h"

namespace clipwarden {

// One rule per two lines reads as a table, so the formatter keeps out.
// clang-format off
const MetricDescriptor& warp_error_descriptor() {
  static const MetricDescriptor d{
      .name = "warp_error",
      .citation = "Lai et al., \"Learning Blind Video Temporal Consistency\", ECCV 2018, eq. (8) "
                  "(warping error); Sundaram, Brox & Keutzer, ECCV 2010 (forward-backward check)",
      .columns = {
          {.name = "warp_error",
           .unit = "squared RGB difference, channels in [0,1] summed (0-3)",
           .description = "Warping error (Lai et al. 2018): squared RGB difference (channels 0\u20131, summed) "
                          "between the frame and the previous frame warped onto it by optical flow, mean over "
                          "non-occluded pixels.",
           .better = Better::lower,
           .frame_rate = FrameRateDependence::per_frame_pair,
           .frame_rate_text = "per frame pair: at a lower frame rate, motion between frames is larger and errors "
                              "grow; compare clips of similar fps, or use the long-range variant",
           // Clean real footage at 512 px: ~0.001-0.005 [guess, to be
           // calibrated]; measured p95 0.001-0.011 on opencv-doc vtest.avi,
           // tree.avi and Megamind.avi (figures in
           // analyzer/policy/default_policy.cpp).
           // A defect confined to a tenth of the frame that moves each
           // channel by 0.3 adds 0.1 * 0.3^2 = 0.009, so enter at 0.012
           // (above the clean range plus such a local defect's smallest
           // visible size) and leave at 0.008 for hysteresis. Peaks: 0.02
           // (4x the clean ceiling) reviews, 0.05 (10x) rejects. baseline_k
           // 5 keeps fast-motion clips, where flow is less exact everywhere,
           // from flagging their whole length.
           .default_rule = {
               SegmentRule{.enter = 0.012, .leave = 0.008, .min_frames = 1, .merge_gap_frames = 2,
                           .baseline_k = 5, .review_peak = 0.02, .reject_peak = 0.05},
               {// p95: at least 5% of the clip is above it; same 4x / 8x reasoning.
                {"p95", 0.015, 0.04},
                // A high mean alone usually means motion the flow cannot
                // follow (blur, fast pans): worth a look, not proof of a defect.
                {"mean", 0.01, kOff}}},
           // A splice to another moment of the same shot keeps the colours
           // and, with a still camera, the layout: only what moved jumps.
           // That is a local discontinuity the warping error sees at the
           // splice, not a cut.
           .catches = {"cut"}},
          {.name = "occluded_pct",
           .unit = "% of pixels",
           .description = "Share of pixels failing the forward\u2013backward flow check (Sundaram et al. 2010), "
                          "in %.",
           .better = Better::none,
           .frame_rate = FrameRateDependence::per_frame_pair,
           .frame_rate_text = "grows with motion per frame, so with a lower frame rate",
           // Measured means 1.5-5.9% on opencv-doc sample clips, but
           // hand-held tree.avi (2 fps) reaches 31% at p95 and FFmpeg's
           // testsrc2 (moving test pattern) averages over 30%: ordinary
           // content the flow cannot follow. A picture that is replaced or
           // melts also fails the check, but then cut, warp_error or boiling
           // name the defect. So occlusion is context, shown as info
           // segments where more than a third of the frame is unexplained,
           // and never reviews or rejects by itself (measured 2026-12-02: as
           // a review rule it flagged clean tree.avi in the accuracy set).
           // It describes the scene's motion, not a defect, so compare
           // leaves it out.
           .default_rule = {
               SegmentRule{.enter = 35, .leave = 25, .min_frames = 2, .merge_gap_frames = 2,
                           .baseline_k = 4, .review_peak = kNever, .reject_peak = kNever},
               {}}},
      }};
  return d;
}
// clang-format on

namespace {

class WarpErrorMetric final : public Metric {
 public:
  const MetricDescriptor& descriptor() const override { return warp_error_descriptor(); }

  void measure_pair(const FramePair& pair, std::span<double> out) const override {
    out[0] = masked_squared_rgb_error(pair.cur->bgr, pair.warped_prev_bgr, pair.valid);
    out[1] = 100.0 * (1.0 - pair.valid_fraction);
  }

  // Across a cut there is no motion to compensate: `cut` reports that frame.
  void finish(Report& report) override {
    if (MetricSeries* s = report.find_series("warp_error")) clear_across_boundaries(s->values, shot_boundaries(report));
  }
};

}  // namespace

std::unique_ptr<Metric> make_warp_error_metric(const AnalysisSettings&) {
  return std::make_unique<WarpErrorMetric>();
}

}  // namespace clipwarden
