// cut: a hard discontinuity between frames t-1 and t (a jump to another
// scene or subject). Two signs must agree: optical flow cannot explain the
// new frame (a low share of pixels passes the forward-backward check), and
// the picture's colour distribution changes (Bhattacharyya distance of
// 8x8x8 BGR histograms, a common practice in shot-boundary detection).
//   cut = sqrt((1 - valid_fraction) * bhattacharyya)   in [0, 1]
// Fast motion alone lowers the valid share but keeps the colours; a
// lighting change shifts colours but flow stays consistent.
#include <algorithm>
#include <cmath>
#include <vector>

#include <opencv2/imgproc.hpp>

#include "analyzer/metrics/metric.h"
#include "analyzer/frame/shot_boundaries.h"
#include "analyzer/metrics/jump_cut.h"

namespace clipwarden {

// One rule per two lines reads as a table, so the formatter keeps out.
// clang-format off
const MetricDescriptor& cut_descriptor() {
  static const MetricDescriptor d{
      .name = "cut",
      .citation = "our own: the forward-backward check of Sundaram, Brox & Keutzer (ECCV 2010) combined "
                  "with the Bhattacharyya distance of colour histograms (common shot-boundary practice)",
      .columns = {
          {.name = "cut",
           .unit = "score (0-1)",
           .description = "A hard discontinuity: flow cannot follow and the picture changes a lot.",
           .better = Better::lower,
           .frame_rate = FrameRateDependence::per_frame_pair,
           .frame_rate_text = "per frame pair: faster motion per frame lowers the consistent share",
           // Generated clips are meant to be one shot, so a cut reviews;
           // several cuts in one clip are a chain of jumps and reject.
           // Measured 2026-12-01 at 512 px: the four hard cuts of opencv-doc
           // Megamind.avi (the ones FFmpeg's scdet finds) score 0.50-0.71;
           // no frame of vtest.avi, tree.avi or Megamind's continuous shots
           // exceeds 0.29. 0.4 sits between. Absolute only (baseline off): a
           // clip's own level must not excuse a jump.
           .default_rule = {
               SegmentRule{.enter = kShotBoundaryCut, .leave = 0.3, .min_frames = 1, .merge_gap_frames = 0,
                           .baseline_k = 0, .review_peak = kShotBoundaryCut, .reject_peak = kNever},
               {{"segment_count", kOff, 3}}},
           .catches = {"cut"}},
          {.name = "jump_cut",
           .unit = "times the frames around it (0 where none)",
           .description = "A jump within one shot: the pair's discontinuity score (cut, 0.15 to the cut "
                          "level) over the second largest of the 5 pairs on either side; 0 elsewhere.",
           .better = Better::lower,
           .frame_rate = FrameRateDependence::per_frame_pair,
           .frame_rate_text = "per frame pair, judged against the pairs around it in the same clip",
           // A splice to another moment of the same shot (a jump cut)
           // keeps the colours, so `cut` reads it well below its level,
           // but no pair near it comes close. Measured 2026-12-05 at 512
           // px on the corpus (docs/accuracy.md, "A jump within one
           // shot"): over the 37 camera clips the highest reading is 3.6
           // (cup.mp4's fifth frame), over the 50 model outputs 3.1 (a
           // GIF's first pair); injected 4 s splices into box.mp4 read 18.7
           // and 18.8. Reviews at 6.
           .default_rule = {
               SegmentRule{.enter = 6, .leave = 6, .min_frames = 1, .merge_gap_frames = 0,
                           .baseline_k = 0, .review_peak = 6, .reject_peak = kNever},
               {}},
           .catches = {"cut"}},
      }};
  return d;
}
// clang-format on

namespace {

// The 8x8x8 histogram cv::calcHist gives for channels {0, 1, 2}, 8 bins
// each over [0, 256): bin = value / 32 per channel, counts as floats in a
// 3-D CV_32F array (calcHist counts 8-bit images in integers and converts),
// so compareHist reads exactly the same numbers. One pass with a 512-entry
// count table instead of calcHist's general machinery.
cv::Mat colour_histogram(const cv::Mat& bgr) {
  CV_Assert(bgr.type() == CV_8UC3);
  // Four tables for pixels in turn: neighbours often share a bin, and one
  // table would make each count wait for the one before.
  int counts[4][512] = {};
  auto bin = [](const uint8_t* p) { return (p[0] >> 5) << 6 | (p[1] >> 5) << 3 | p[2] >> 5; };
  for (int y = 0; y < bgr.rows; ++y) {
    const uint8_t* p = bgr.ptr<uint8_t>(y);
    int x = 0;
    for (; x + 3 < bgr.cols; x += 4, p += 12) {
      ++counts[0][bin(p)];
      ++counts[1][bin(p + 3)];
      ++counts[2][bin(p + 6)];
      ++counts[3][bin(p + 9)];
    }
    for (; x < bgr.cols; ++x, p += 3) ++counts[0][bin(p)];
  }
  static const int bins[] = {8, 8, 8};
  cv::Mat hist(3, bins, CV_32F);
  float* h = hist.ptr<float>();
  for (int i = 0; i < 512; ++i) h[i] = static_cast<float>(counts[0][i] + counts[1][i] + counts[2][i] + counts[3][i]);
  return hist;
}

// `from` with each channel scaled so its mean is `to`'s (a channel with a
// mean under one code is left as it is).
cv::Mat gain_matched(const cv::Mat& from, const cv::Mat& to) {
  const cv::Scalar mean_from = cv::mean(from), mean_to = cv::mean(to);
  cv::Scalar gain;
  for (int c = 0; c < 3; ++c) gain[c] = mean_from[c] >= 1 ? mean_to[c] / mean_from[c] : 1.0;
  cv::Mat scaled;
  cv::multiply(from, gain, scaled);
  return scaled;
}

// Below this a pair's discontinuity is within what moving content gives
// (vtest's walkers, a hand-held cup: 0.01-0.1); from the cut level up the
// pair is `cut`'s. Pairs on either side compared, and the floor under
// their reading (a still scene reads ~0.01: no ratio to noise).
constexpr double kJumpMinScore = 0.15;
constexpr int kJumpNeighbours = 5;
constexpr double kJumpNeighbourFloor = 0.01;

}  // namespace

std::vector<double> jump_cut_series(const std::vector<double>& cut) {
  std::vector<double> jump(cut.size(), kUndefined);
  const int n = static_cast<int>(cut.size());
  std::vector<double> around;
  for (int i = 0; i < n; ++i) {
    if (std::isnan(cut[i])) continue;
    jump[i] = 0;
    if (cut[i] < kJumpMinScore || cut[i] >= kShotBoundaryCut) continue;
    around.clear();
    for (int j = std::max(0, i - kJumpNeighbours); j <= std::min(n - 1, i + kJumpNeighbours); ++j)
      if (j != i && !std::isnan(cut[j])) around.push_back(cut[j]);
    if (around.size() < 2) continue;
    // The second largest, so that a jump away and back (one frame spliced
    // in) still reads against the frames around the pair of jumps.
    std::nth_element(around.begin(), around.end() - 2, around.end());
    jump[i] = cut[i] / std::max(around[around.size() - 2], kJumpNeighbourFloor);
  }
  return jump;
}

namespace {

class CutMetric final : public Metric {
 public:
  const MetricDescriptor& descriptor() const override { return cut_descriptor(); }
  void measure_pair(const FramePair& pair, std::span<double> out) const override {
    const cv::Mat current = colour_histogram(pair.cur->bgr);
    const double plain =
        cv::compareHist(colour_histogram(pair.prev->bgr), current, cv::HISTCMP_BHATTACHARYYA);
    // A fade scales every value by one gain (per channel for a white-balance
    // shift): the previous frame scaled to the current one's channel means
    // has the current one's colours, where another scene does not. Near
    // black a fade moves most pixels across the histogram's coarse bins and
    // the flow loses the dim picture, so without this a fade read as a cut.
    const double distance = std::min(
        plain, cv::compareHist(colour_histogram(gain_matched(pair.prev->bgr, pair.cur->bgr)),
                               current, cv::HISTCMP_BHATTACHARYYA));
    out[0] = std::sqrt(std::clamp(1.0 - pair.valid_fraction, 0.0, 1.0) * std::clamp(distance, 0.0, 1.0));
  }

  void finish(Report& report) override {
    const MetricSeries* cut = report.find_series("cut");
    MetricSeries* jump = report.find_series("jump_cut");
    if (cut && jump) jump->values = jump_cut_series(cut->values);
  }
};

}  // namespace

std::unique_ptr<Metric> make_cut_metric(const AnalysisSettings&) { return std::make_unique<CutMetric>(); }

}  // namespace clipwarden
