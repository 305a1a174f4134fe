// flicker: brightness change that motion does not explain.
// For each pair, d_t = mean over consistent pixels of Y_t - W(Y_{t-1}), the
// change of relative luminance after motion compensation (a moving bright
// object adds nothing; a pulse of the whole picture does). The
// motion-compensated luminance track is L_0 = mean Y_0, L_t = L_{t-1} + d_t.
// flicker_t = |L_t - m_t| / max(m_t, p_t, 0.02), m_t = median(L over a
// centred 1 s window), p_t the same median of the plain mean luminance:
// slow lighting changes (a sunset, an exposure ramp) follow the median and
// score ~0 (a median of a monotone stretch is its middle value), pulses
// shorter than half a second stand out. Within half a second of a shot's
// first or last frame the centred window does not fit; there m_t is a
// Theil-Sen line through the nearest half second (at least 9 frames), which
// follows a brightening or fade that runs on to the clip's end (a shrunk
// median lags it and read real footage's last frames as flicker) and still
// leaves a pulse of a few frames at the very start standing out (mirroring
// the series at the ends would hide it). Units:
// a fraction of the local luminance level, as the IES percent flicker is a
// fraction of the mean: what a viewer sees is the relative change (Weber's
// law), so a 5% pulse reads the same in a night scene as at noon. Below a
// relative luminance of 0.02 (about 2 cd/m2 on a 100 cd/m2 display) the
// visible step stops shrinking with the level (the de Vries-Rose range;
// common practice), and dividing by the floor keeps sensor and coding noise
// in near-black frames from reading as large pulses.
// Natural light changes once (an exposure step, firelight dipping, a bright
// object leaving the picture in a pan); generated flicker repeats in place.
// So a departure from the level with no comparable departure within a
// second of it (analyzer/metrics/light_excursions.h) counts at half: one
// step needs twice the amplitude of a repeated pulse to reach a level.
// At a cut the track starts again from the new shot's own level and the
// median window stays inside one shot, so a cut is not flicker (`cut`
// reports it); the cut frame's flicker is undefined.
// Also writes `luminance`, the frame's plain mean relative luminance.
#include <algorithm>
#include <cmath>

#include "analyzer/color/color_space.h"
#include "analyzer/frame/series_math.h"
#include "analyzer/frame/shot_boundaries.h"
#include "analyzer/metrics/flicker_statistics.h"
#include "analyzer/metrics/image_error.h"
#include "analyzer/metrics/light_excursions.h"
#include "analyzer/metrics/metric.h"

namespace clipwarden {

// One rule per two lines reads as a table, so the formatter keeps out.
// clang-format off
const MetricDescriptor& flicker_descriptor() {
  static const MetricDescriptor d{
      .name = "flicker",
      .citation = "our own: motion-compensated mean relative luminance (sRGB per IEC 61966-2-1, BT.709 "
                  "weights) against a centred 1 s running median, relative as in the IES percent flicker",
      .columns = {
          {.name = "luminance",
           .unit = "relative luminance (0-1)",
           .description = "The frame's mean relative luminance (linear sRGB, BT.709 weights); describes "
                          "the picture, not judged.",
           .better = Better::none,
           .frame_rate = FrameRateDependence::none,
           .frame_rate_text = "none: one frame's own value",
           .default_rule = {}},
          {.name = "flicker",
           .unit = "fraction of the local luminance level",
           .description = "Brightness change that motion does not explain (relative luminance after motion "
                          "compensation, against its running median); a change not repeated within 1 s counts "
                          "at half.",
           .better = Better::lower,
           .frame_rate = FrameRateDependence::per_second,
           .frame_rate_text = "the median window is in seconds, so pulses shorter than 1/2 s count at any fps",
           // Measured 2026-12-02 at 320 px on clean opencv-doc footage (p95
           // / max): vtest.avi 0.001 / 0.003, box.mp4 0.006 / 0.010, cup.mp4
           // 0.007 / 0.008, tree.avi 0.007 / 0.013, Megamind.avi 0.027 /
           // 0.037 (a trailer's lighting changes). Injected square-wave
           // flicker of gain +-a (clipwarden inject) reads about a. Enter at
           // 0.04 (above every clean clip's maximum; weak a = 0.03 flicker,
           // near the limit of notice, is mostly let through), review at
           // 0.05, reject at 0.15 (a pulse of 15% is plain to anyone). One
           // frame is enough: a one-frame pulse is the typical defect, when it
           // repeats. A lone change counts at half (measured 2026-12-05 on the
           // real-footage corpus, camera clips: a stove's light dipping as the
           // camera swings away 0.094, a gym's exposure stepping 0.058, a
           // cockatoo's head at the lens 0.082, all once; docs/accuracy.md),
           // so a single step reviews from 0.10 and rejects from 0.30.
           .default_rule = {
               SegmentRule{.enter = 0.04, .leave = 0.02, .min_frames = 1, .merge_gap_frames = 2,
                           .baseline_k = 5, .review_peak = 0.05, .reject_peak = 0.15},
               {// 5% of the clip pulsing by 5% is a clip-wide flicker. Not below
                // the segment's review level: in a clip of 25 frames 5% is one
                // frame, and the p95 reviewed a lone dip the segment rule rates
                // info (a stove's light as the camera swings away, 0.045 after
                // halving; measured 2026-12-05, docs/accuracy.md).
                {"p95", 0.05, 0.1},
                // Three separate pulses in one clip read as unsteady light.
                {"segment_count", 3, kOff},
                // Half a second of flicker in total reviews, 1.5 s rejects.
                {"segment_total_s", 0.5, 1.5}}},
           .catches = {"flicker"}},
      }};
  return d;
}
// clang-format on

namespace {

constexpr double kMedianWindow_s = 1.0;
constexpr double kFrameDarkFloor = 0.02;
constexpr int kEdgeFrames = 9;
// What a lone departure counts for, and how departures are told apart
// (light_excursions.h): from 2% of the level (the series' leave level),
// repeated by one at least half as large within the median window.
constexpr double kLoneWeight = 0.5;
constexpr ExcursionRule kExcursions{.min_level = 0.02, .comparable_share = 0.5, .within_s = kMedianWindow_s};

// The sRGB encoding, odd around 0 (the track is a running sum and can
// drift below it; the curve is linear there, so it stays smooth).
double encoded(double linear) {
  return linear < 0 ? -color::linear_to_srgb(-linear) : color::linear_to_srgb(linear);
}
double decoded(double value) {
  return value < 0 ? -color::srgb_to_linear(-value) : color::srgb_to_linear(value);
}

// The slow level of one shot's track (running_level), found on its
// sRGB-encoded values: editors and generators fade by scaling code values,
// so a fade to black is a straight line there and a curve that plunges
// towards 0 in linear light, which a line through the last frames
// overshoots (a fade over opencv-doc vtest.avi's last 2 s read 0.29 at its
// last frame). Medians are the same in either domain (the encoding is
// monotone), so only the line at the shot's ends changes.
std::vector<double> level_of(std::span<const double> track, int half, int edge_frames) {
  std::vector<double> values(track.begin(), track.end());
  for (double& v : values) v = encoded(v);
  std::vector<double> level = running_level(values, half, edge_frames);
  for (double& v : level) v = decoded(v);
  return level;
}

class FlickerMetric final : public Metric {
 public:
  const MetricDescriptor& descriptor() const override { return flicker_descriptor(); }

  void measure_first(const FramePlanes& frame, std::span<double> out) const override {
    out[0] = cv::mean(frame.luminance)[0];
  }

  void measure_pair(const FramePair& pair, std::span<double> out) const override {
    out[0] = cv::mean(pair.cur->luminance)[0];
    // Raw step d_t; finish() turns the steps into the high-passed track.
    out[1] = masked_mean_difference(pair.cur->luminance, pair.warped_prev_luminance, pair.valid);
  }

  void finish(Report& report) override {
    MetricSeries* luminance = report.find_series("luminance");
    MetricSeries* flicker = report.find_series("flicker");
    if (!luminance || !flicker || flicker->values.empty()) return;
    std::vector<double>& v = flicker->values;
    const size_t n = v.size();
    const std::vector<bool> boundary = shot_boundaries(report);
    auto starts_shot = [&](size_t t) { return t < boundary.size() && boundary[t]; };
    std::vector<double> track(n);
    track[0] = luminance->values[0];
    for (size_t t = 1; t < n; ++t) {
      if (starts_shot(t)) {
        track[t] = luminance->values[t];
        continue;
      }
      // No consistent pixel at all: fall back to the plain change.
      const double step = std::isnan(v[t]) ? luminance->values[t] - luminance->values[t - 1] : v[t];
      track[t] = track[t - 1] + step;
    }
    const double dt = median_frame_interval_s(report.frame_times_s);
    const int half = std::max(2, dt > 0 ? static_cast<int>(std::lround(kMedianWindow_s / 2 / dt)) : 2);
    // At a shot's ends the level is a robust line over the nearest half
    // second, but over at least kEdgeFrames frames so that a pulse of two or
    // three frames at 8 fps is still a minority of the line's points.
    const int edge_frames = std::max(half + 1, kEdgeFrames);
    // High-pass each shot on its own.
    for (size_t begin = 0; begin < n;) {
      size_t end = begin + 1;
      while (end < n && !starts_shot(end)) ++end;
      const std::span<const double> shot(track.data() + begin, end - begin);
      const std::span<const double> plain(luminance->values.data() + begin, end - begin);
      const std::vector<double> level = level_of(shot, half, edge_frames);
      const std::vector<double> picture_level = running_median(plain, half);
      for (size_t t = begin; t < end; ++t) {
        // The track is a running sum of motion-compensated steps; when the
        // consistent pixels are biased (flames appearing fail the
        // forward-backward check more often than flames fading) it drifts
        // far from the picture's own level, even below zero. The relative
        // change is taken against the larger of the two levels, so a drift
        // never inflates it.
        const double denominator =
            std::max({level[t - begin], picture_level[t - begin], kFrameDarkFloor});
        v[t] = (track[t] - level[t - begin]) / denominator;  // signed until below
      }
      begin = end;
    }
    clear_across_boundaries(v, boundary);
    const std::vector<bool> lone = lone_excursion_frames(v, report.frame_times_s, kExcursions);
    for (size_t t = 0; t < n; ++t) v[t] = std::fabs(v[t]) * (lone[t] ? kLoneWeight : 1.0);
    add_statistics(track, boundary, luminance->values, report);
  }

 private:
  // Clip-level percent flicker, flicker index (IES) and dominant frequency
  // (analyzer/metrics/flicker_statistics.h) of the motion-compensated track,
  // joined across shot boundaries (no step at a cut) so a cut's jump in
  // level is not read as flicker.
  static void add_statistics(const std::vector<double>& track, const std::vector<bool>& boundary,
                             const std::vector<double>& luminance, Report& report) {
    std::vector<double> joined(track);
    double offset = 0;
    for (size_t t = 1; t < joined.size(); ++t) {
      if (t < boundary.size() && boundary[t]) offset += track[t - 1] - track[t];
      joined[t] = track[t] + offset;
    }
    // Re-centred on the plain mean luminance: the track is a running sum of
    // motion-compensated changes, exact in its swings but not in its level.
    const std::vector<double> plain = defined_values(luminance);
    double level = 0;
    for (double v : plain) level += v / static_cast<double>(plain.size());
    const FlickerStatistics s =
        flicker_statistics(joined, report.frame_times_s, kMedianWindow_s, level);
    auto number = [](double x) { return std::isnan(x) ? nlohmann::json() : nlohmann::json(x); };
    report.summary.details["flicker"] = {
        {"percent_flicker", number(s.percent_flicker)},
        {"flicker_index", number(s.flicker_index)},
        {"dominant_frequency_hz", number(s.dominant.frequency_hz)},
        {"dominant_power_share", number(s.dominant.power_share)},
        {"series", "motion-compensated mean relative luminance, slow change removed"}};
  }
};

}  // namespace

std::unique_ptr<Metric> make_flicker_metric(const AnalysisSettings&) {
  return std::make_unique<FlickerMetric>();
}

}  // namespace clipwarden
