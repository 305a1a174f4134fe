// flicker_local: regions that pulse in brightness while motion does not
// explain it (analyzer/metrics/block_pulses.h says how pulses are found).
// Per frame: the amplitude of the strongest block pulse that spans the frame
// (from the frame where its first swing was confirmed to the frame where the
// swing back was), as a fraction of the block's luminance, 0 where no block
// pulses; undefined for frame 0. We chose the amplitude over the share of the frame that
// pulses because it reads the same whatever the grid: the share is in
// summary.flicker_local.details (max_area_pct), with the blocks involved.
//
// Frame-rate dependence: pulses are confirmed on swings of the accumulated
// level, so a pulse spread over several frames at 60 fps counts like the
// same pulse in one frame at 8 fps; the pulse window is in seconds.
#include <algorithm>
#include <cmath>
#include <map>

#include <opencv2/imgproc.hpp>

#include "analyzer/frame/shot_boundaries.h"
#include "analyzer/metrics/block_pulses.h"
#include "analyzer/metrics/metric.h"
#include "analyzer/metrics/still_light_fit.h"

namespace clipwarden {

// One rule per two lines reads as a table, so the formatter keeps out.
// clang-format off
const MetricDescriptor& flicker_local_descriptor() {
  static const MetricDescriptor d{
      .name = "flicker_local",
      .citation = "our own: block pulses of motion-compensated luminance, relative to the block's level "
                  "(Weber's law)",
      .columns = {
          {.name = "flicker_local",
           .unit = "fraction of the block's luminance",
           .description = "Strongest region that brightens and darkens back within half a second while "
                          "motion does not explain it: its amplitude; 0 where nothing pulses.",
           .better = Better::lower,
           .frame_rate = FrameRateDependence::per_second,
           .frame_rate_text = "pulses are confirmed on swings of the accumulated level and their window is in "
                              "seconds, so a pulse spread over several frames at 60 fps counts like one frame at "
                              "8 fps",
           // Measured 2026-12-02 at 320 px on clean opencv-doc footage
           // (max): box.mp4, vtest.avi 0; tree.avi 0.076; cup.mp4 0.091;
           // Megamind.avi 0.138 where a face changes its shading (appearance
           // change the flow cannot follow). Injected local flicker
           // (clipwarden inject) reads about its gain: weak 0.1, moderate
           // 0.25. So: enter at 0.1, review at 0.18 (above the face), reject
           // at 0.35 (a region blinking by a third). The clip-level rule
           // catches a clip that pulses throughout at a lower amplitude:
           // details.recurring_p95, the p95 capped at the level reached at
           // two frames more than a pulse's longest span (1 s) apart. The
           // plain p95 reviewed an aquarium (corpus, 227 frames, 2026-12-05)
           // for one 0.4 s shimmer of a lit rim: 12 frames, 5% of the clip.
           .default_rule = {
               SegmentRule{.enter = 0.1, .leave = 0.05, .min_frames = 1, .merge_gap_frames = 2,
                           .baseline_k = 5, .review_peak = 0.18, .reject_peak = 0.35},
               {{"details.recurring_p95", 0.15, 0.3}}},
           .catches = {"local_flicker"}},
      }};
  return d;
}
// clang-format on

namespace {

constexpr int kGridCols = 16, kGridRows = 16;
// Block changes are relative to the block's own luminance (Weber's law: a
// viewer sees the ratio), with the level floored at 0.02 like `flicker`
// (below it the visible step stops shrinking: de Vries-Rose range, common
// practice), so a pulsing lamp in a night scene counts like one at noon. A
// swing of 6% of a region's luminance is a visible step for a region of a
// block's size (Weber fractions of a few percent are visible for large
// fields: common practice). Pulses: out and back within half a second,
// i.e. pulse rates of 1 Hz and faster.
constexpr float kRegionDarkFloor = 0.02f;
constexpr double kMinSwing = 0.06;
constexpr double kMaxPulse_s = 0.5;
// Pixels within this many pixels of one that fails the forward-backward
// check are left out too: next to an occlusion boundary the check still
// passes but the warp already mixes the two surfaces.
constexpr int kOcclusionMargin_px = 3;
// A change counts as light only where the block's texture kept its pattern
// (block_texture_agreement at least this); blocks whose spread is below
// 2% of their mean on both sides are flat and have no pattern to judge.
constexpr float kMinTextureAgreement = 0.75f;
constexpr float kFlatSpread = 0.02f;
// ... and only blocks with nothing moving of its own nearby: own motion
// (apart from the camera) at most 0.75 px per frame at a 512 px long side
// in the block and its eight neighbours. DIS flow on a still scene departs
// from the camera fit by a few tenths of a pixel; a walker, a limb or a
// passing object by a pixel or more. The neighbours count because the flow
// often holds the edges of a smooth moving body but not its inside.
constexpr float kMaxOwnMotion_px = 0.75f;

// ... and only where light explains the change: the spread of what a gain
// and an offset of the surface leave (block_light_fit) at most this share
// of the block's mean change, unless that spread is under 2% of the
// block's luminance (sensor and codec noise, interpolation of the warp;
// below the 6% swing a pulse needs, so a slow pulse whose per-frame steps
// are small is never judged by its noise). Measured 2026-12-05 (corpus,
// docs/accuracy.md, "Light that a gain cannot explain"): caustics on an
// Open-Sora coral reef (a reject at 0.64) and the shimmer of an aquarium's
// lit rim no longer pulse, an aurora falls from 0.66 to 0.26; moderate
// pulses injected into camera footage are found as before, one of six on
// model outputs (on moving sea waves) is lost.
constexpr float kMaxLightMisfit = 0.3f;
constexpr float kNoiseSpread = 0.02f;

// Those gates read the flow, and a pulse of light moves DIS flow: on the
// steepest frames of a pulse injected beside a talking face (Megamind, 512
// px) the region's own motion rose from 0.25-0.45 to 0.7-0.87 px and the
// warp left a pattern behind, so 7 of 8 injected pulses on camera footage
// were lost (docs/accuracy.md, "Local flicker judged on a flow the pulse
// does not move"). So a block is first judged without the flow
// (still_light_fit.h): against the previous frame warped by the camera
// alone, its own motion fitted beside a gain and an offset. It holds still
// when that motion is at most kMaxOwnMotion_px and light explains the rest
// (the misfit rule above). Its texture must show such a motion as a misfit
// of at least 0.5% of its luminance, or it cannot vouch for itself (a flat
// block, one straight edge, a ramp sliding along itself): animated films'
// smooth surfaces show 0.75 px at 0.5-2%, and at 2% the Megamind pulse
// stayed lost.
constexpr float kStillProbeSpread = 0.005f;
// The fit is first order: it reads motions of a pixel or two, not a scene
// travelling many pixels a frame (a camera dipping under a waterline moves
// parts of the picture 11-15 px a frame at 8 fps, where it read a block
// "still" and brought a false reject). A block with flow of its own above
// this many times kMaxOwnMotion_px in it or beside it cannot vouch for
// itself; a pulse moved the flow by at most 1.7 px (2.3x) on the cases
// measured.
constexpr float kFastMotionFactor = 4.0f;

// Pulses while the picture pulses in this many separate places or more
// (places_pulsing_around, within kMaxPulse_s) count at most
// kScenePulseCap: above the review level 0.18 and the clip rule's 0.15,
// under the reject levels 0.35 and 0.3. Measured 2026-12-05 at 512 px
// (docs/accuracy.md, "Light that plays over the scene"): an Allegro aurora
// (a model output) pulses in up to 9 places at once; pulses injected into
// 12 camera and model bases in 1 place, the city clip's dark shot after its
// cut in 2.
constexpr int kScenePlaces = 3;
constexpr double kScenePulseCap = 0.25;

class FlickerLocalMetric final : public Metric {
 public:
  const MetricDescriptor& descriptor() const override { return flicker_local_descriptor(); }
  bool needs_in_order() const override { return true; }
  // The block changes need only this pair: computed here, concurrently;
  // only the pulse tracking follows the frames in order.
  void measure_pair(const FramePair& pair, std::span<double>) const override {
    BlockChanges& c = pair.scratch.slot<BlockChanges>(this);
    c.changes = changes_of(pair);
    c.frame_index = pair.cur->index;
    c.t_s = pair.cur->t_s;
  }

  void observe_in_order(const FramePair& pair, std::span<double>) override {
    BlockChanges& c = pair.scratch.slot<BlockChanges>(this);
    if (c.frame_index != pair.cur->index || c.t_s != pair.cur->t_s) c.changes = changes_of(pair);
    c.frame_index = -1;  // used
    // Kept until finish(): the shot boundaries come from `cut`'s series,
    // known only then.
    history_.push_back({pair.cur->index, pair.cur->t_s, std::move(c.changes)});
    block_size_ = {pair.cur->luminance.cols / kGridCols, pair.cur->luminance.rows / kGridRows};
  }

  void finish(Report& report) override {
    MetricSeries* series = report.find_series("flicker_local");
    if (!series) return;
    std::vector<Pulse> pulses = pulses_with_neighbours(pulses_by_shot(shot_boundaries(report)), kGridCols);
    // Light that plays over the scene pulses in several places at once (an
    // aurora's curtains); a pulsing region is one place. Such pulses stay
    // at most a review: whether that play is a defect is a reviewer's call.
    const std::vector<int> places =
        places_pulsing_around(pulses, report.frame_times_s, kMaxPulse_s, kGridCols, kGridRows);
    int capped = 0;
    for (size_t i = 0; i < pulses.size(); ++i)
      if (places[i] >= kScenePlaces && pulses[i].amplitude > kScenePulseCap) {
        pulses[i].amplitude = kScenePulseCap;
        ++capped;
      }
    auto& v = series->values;
    const size_t n = v.size();
    std::vector<int> blocks_pulsing(n, 0);
    for (size_t i = 1; i < n; ++i) v[i] = 0;
    for (const Pulse& p : pulses)
      for (int64_t f = std::max<int64_t>(1, p.start_frame); f <= p.end_frame && f < static_cast<int64_t>(n); ++f) {
        v[f] = std::max(v[f], p.amplitude);
        ++blocks_pulsing[f];  // a block counts once per pulse at a frame
      }
    nlohmann::json d = details(pulses, blocks_pulsing);
    d["scene_pulses_capped"] = capped;
    // A pulse spans at most 2 * kMaxPulse_s (its first swing and the swing
    // back each within kMaxPulse_s), so two frames further apart than that
    // lie in two pulses at least.
    d["recurring_p95"] = recurring_quantile(v, report.frame_times_s, 0.95, 2 * kMaxPulse_s);
    report.summary.details["flicker_local"] = std::move(d);
  }

 private:
  struct BlockChanges {
    std::vector<float> changes;
    int64_t frame_index = -1;  // which frame's changes it holds; -1: none
    double t_s = 0;
  };

  static std::vector<float> changes_of(const FramePair& pair) {
    const cv::Mat& cur = pair.cur->luminance;
    const float max_motion =
        kMaxOwnMotion_px * static_cast<float>(std::max(cur.cols, cur.rows)) / 512.0f;
    cv::Mat valid;
    if (!pair.valid.empty())
      cv::erode(pair.valid, valid,
                cv::getStructuringElement(cv::MORPH_RECT, cv::Size(2 * kOcclusionMargin_px + 1,
                                                                   2 * kOcclusionMargin_px + 1)));
    std::vector<float> changes =
        block_luminance_changes(cur, pair.warped_prev_luminance, valid, kGridCols, kGridRows, kRegionDarkFloor);
    const std::vector<float> agreement =
        block_texture_agreement(cur, pair.warped_prev_luminance, valid, kGridCols, kGridRows, kFlatSpread);
    std::vector<float> own_motion =
        pair.flow_backward.empty()
            ? std::vector<float>(changes.size(), 0.0f)
            : block_own_motion(pair.flow_backward, pair.camera_homography, pair.valid, kGridCols, kGridRows);
    const std::vector<LightFit> light =
        block_light_fit(cur, pair.warped_prev_luminance, valid, kGridCols, kGridRows, kRegionDarkFloor);

    // Blocks that hold still under the light, judged without the flow: their
    // change is read against the camera warp, and neither the flow nor a
    // neighbour moving of its own vetoes them.
    cv::Mat camera_warped, camera_valid;
    camera_warp(pair.prev->luminance, pair.camera_homography, camera_warped, camera_valid);
    const std::vector<StillLightFit> still = block_still_light_fit(
        cur, camera_warped, camera_valid, kGridCols, kGridRows, kRegionDarkFloor, max_motion, kStillProbeSpread);
    const std::vector<float> still_changes =
        block_luminance_changes(cur, camera_warped, camera_valid, kGridCols, kGridRows, kRegionDarkFloor);
    const std::vector<bool> near_fast =
        blocks_near_movers(own_motion, kGridCols, kGridRows, kFastMotionFactor * max_motion);
    std::vector<bool> holds_still(changes.size());
    for (size_t b = 0; b < changes.size(); ++b) {
      holds_still[b] = still[b].motion_observable && still[b].motion_px <= max_motion &&
                       !misfit(still[b].residual_spread, still[b].mean_change) &&
                       !std::isnan(still_changes[b]) && !near_fast[b];
      if (holds_still[b]) changes[b] = still_changes[b], own_motion[b] = still[b].motion_px;
    }
    const std::vector<bool> near_movers = blocks_near_movers(own_motion, kGridCols, kGridRows, max_motion);
    remove_common_change(changes);
    // After the common change is known (a pattern-changing block still
    // tells how the frame's light went): only blocks that hold still, or
    // that kept their pattern with no mover near and whose change light
    // explains, may carry a change of their own.
    for (size_t b = 0; b < changes.size(); ++b) {
      if (holds_still[b] || std::isnan(changes[b])) continue;
      if (agreement[b] < kMinTextureAgreement || near_movers[b] ||
          misfit(light[b].residual_spread, light[b].mean_change))
        changes[b] = 0;
    }
    return changes;
  }

  // What a gain and an offset leave is more than noise and more than a
  // share of the change itself: a pattern of its own.
  static bool misfit(float residual_spread, float mean_change) {
    return residual_spread > std::max(kNoiseSpread, kMaxLightMisfit * std::fabs(mean_change));
  }

  nlohmann::json details(const std::vector<Pulse>& pulses, const std::vector<int>& blocks_pulsing) const {
    struct BlockSummary {
      int pulses = 0;
      double max_amplitude = 0;
    };
    std::map<int, BlockSummary> by_block;
    for (const Pulse& p : pulses) {
      auto& s = by_block[p.block];
      ++s.pulses;
      s.max_amplitude = std::max(s.max_amplitude, p.amplitude);
    }
    std::vector<std::pair<int, BlockSummary>> ranked(by_block.begin(), by_block.end());
    std::sort(ranked.begin(), ranked.end(), [](const auto& a, const auto& b) {
      return a.second.pulses != b.second.pulses ? a.second.pulses > b.second.pulses
                                                : a.second.max_amplitude > b.second.max_amplitude;
    });
    nlohmann::json blocks = nlohmann::json::array();
    for (size_t i = 0; i < ranked.size() && i < 12; ++i)
      blocks.push_back({{"row", ranked[i].first / kGridCols},
                        {"col", ranked[i].first % kGridCols},
                        {"pulses", ranked[i].second.pulses},
                        {"max_amplitude", ranked[i].second.max_amplitude}});
    const int most = blocks_pulsing.empty() ? 0 : *std::max_element(blocks_pulsing.begin(), blocks_pulsing.end());
    return {{"units", "fraction of the block's luminance (amplitude of the strongest block pulse)"},
            {"grid", {kGridCols, kGridRows}},
            {"block_px", {block_size_.width, block_size_.height}},
            {"min_swing", kMinSwing},
            {"max_pulse_s", kMaxPulse_s},
            {"pulses", pulses.size()},
            {"blocks_involved", by_block.size()},
            {"max_area_pct", 100.0 * most / (kGridCols * kGridRows)},
            {"blocks", blocks}};
  }

  // The pulses of the pairs seen, each block's level starting afresh at
  // each shot boundary (a cut replaces the block's content: its jump is no
  // light, and the level before it says nothing about the new shot).
  std::vector<Pulse> pulses_by_shot(const std::vector<bool>& boundaries) const {
    BlockPulseTracker tracker{kGridCols * kGridRows, kMinSwing, kMaxPulse_s};
    for (const PairChanges& h : history_) {
      if (h.frame >= 0 && static_cast<size_t>(h.frame) < boundaries.size() && boundaries[h.frame]) {
        tracker.restart();
        continue;  // the change across the cut
      }
      tracker.add(h.frame, h.t_s, h.changes);
    }
    return tracker.pulses();
  }

  struct PairChanges {
    int64_t frame = 0;
    double t_s = 0;
    std::vector<float> changes;
  };
  std::vector<PairChanges> history_;
  cv::Size block_size_;
};

}  // namespace

std::unique_ptr<Metric> make_flicker_local_metric(const AnalysisSettings&) {
  return std::make_unique<FlickerLocalMetric>();
}

}  // namespace clipwarden
