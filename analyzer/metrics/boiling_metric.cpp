// boiling: texture that is re-drawn every frame in part of the picture
// ("boiling", the animators' word for lines and textures that crawl although
// nothing moves). Motion cannot explain it, yet it hardly moves the
// whole-frame warping error: a patch of fresh noise on a tenth of the frame
// is lost in the spread of ordinary motion.
//
// Its signature is statistical. Let r_t = V_t - W(V_{t-1}) be the residual
// left after motion compensation (the warping error's per-pixel term,
// Lai et al. 2018). If a region carries noise n_t drawn afresh each frame
// with variance s^2 per channel, then r_t = n_t - n_{t-1} and
// r_{t+1} = n_{t+1} - n_t, so E[r_t . r_{t+1}] = -E[n_t^2] = -s^2:
// successive residuals are anti-correlated, with a covariance equal to
// minus the noise variance. Residuals of ordinary content are small, or
// (where the flow is off at a moving edge) come and go with the edge with
// no consistent sign. So per region we read
//   c = - mean over pixels of sum_channels r_t(x) . W(r_{t-1})(x)
// (RGB in [0,1]; the earlier residual warped onto frame t by the same
// flow), over cells of about an eighth of the long side where both
// residuals pass the forward-backward check for at least half the cell.
// Against the other cells: a source with grain everywhere raises every cell
// alike and is not a local defect. Units: 8-bit noise of standard deviation
// sigma, smooth at the scale of a few pixels, added to all channels gives
// 3 (sigma/255)^2, e.g. 0.0046 for 10.
//
// Pixel-fine noise under sub-pixel motion reads less: warping interpolates,
// and an interpolated sum of independent pixels has less variance (half at
// a half-pixel shift). Grain a few pixels across, as generated textures
// boil, is hardly affected.
//
// Scale. Film grain, sensor noise and GIF dithering are fresh every frame
// too, but pixel-fine; generated textures boil in blobs of a few pixels. So
// the residual is averaged over 3 x 3 pixels before the product: pixel-fine
// noise keeps a ninth of its variance (the mean of 9 independent values),
// a blob several pixels across keeps most of its own.
//
// Natural re-drawing. Water, foliage and flames re-draw their texture all
// the time, in the same place, at a steady level; generated boiling starts
// and stops, or sits where nothing should change. So each cell is judged
// against its own quiet level over the clip, the lower quartile of its
// values (a boiling that covers up to three quarters of the clip still
// leaves the quartile at the cell's clean level), and the frame's value is
// the worst cell's excess over its quiet level minus the median cell's.
//
// Frame rate: the statistic compares adjacent frames, so noise re-drawn
// every frame reads the same at any frame rate.
#include <algorithm>
#include <cmath>
#include <utility>
#include <vector>

#include <opencv2/imgproc.hpp>

#include "analyzer/metrics/metric.h"
#include "analyzer/frame/shot_boundaries.h"

namespace clipwarden {

// One rule per two lines reads as a table, so the formatter keeps out.
// clang-format off
const MetricDescriptor& boiling_descriptor() {
  static const MetricDescriptor d{
      .name = "boiling",
      .citation = "our own: anti-correlation of successive motion-compensated residuals (the per-pixel term "
                  "of Lai et al.'s warping error, ECCV 2018)",
      .columns = {
          {.name = "boiling",
           .unit = "residual covariance, RGB in [0,1]: fresh noise of 8-bit sd s reads 3 (s/255)^2",
           .description = "Texture re-drawn every frame in part of the picture: the worst cell's "
                          "anti-correlation of successive motion-compensated residuals above its own quiet "
                          "level, minus the median cell's.",
           .better = Better::lower,
           .frame_rate = FrameRateDependence::none,
           .frame_rate_text = "adjacent frames: noise re-drawn every frame reads the same at any fps",
           // Fresh noise of 8-bit standard deviation s in a region reads
           // 3 (s/255)^2, e.g. 0.0046 for s = 10. Measured 2026-12-02 at 320
           // px on opencv-doc footage: clean box.mp4 / cup.mp4 / Megamind.avi
           // median 0.00003, max 0.0003-0.0027 (single frames); vtest.avi
           // (walkers) median 0.0014, max 0.016 in brief spikes at walkers'
           // edges; tree.avi median 0.0065. Injected boiling (clipwarden
           // inject, moderate, s = 10, smooth grain): 0.0016-0.0042 through
           // the defect. Enter at 0.0012 (s ~ 5), review at 0.002 (s ~ 6.5).
           // Review only: synthetic content that is legitimately re-drawn
           // (FFmpeg testsrc2's running counter, 0.02-0.13 at 320x240) and
           // rough flow (hand-held tree.avi at 2 fps, up to 0.018) read high
           // too, and a reject level would cap the clip's own baseline
           // there. A boiling texture lasts, so 4 frames minimum, and the
           // clip's own baseline (6 MAD-sigmas) keeps busy clips fair.
           .default_rule = {
               SegmentRule{.enter = 0.0012, .leave = 0.0008, .min_frames = 4, .merge_gap_frames = 2,
                           .baseline_k = 6, .review_peak = 0.002, .reject_peak = kNever},
               {}},
           .catches = {"boiling"}},
      }};
  return d;
}
// clang-format on

namespace {

constexpr int kCellsPerLongSide = 8;
constexpr double kMinValidShare = 0.5;
// Below this many measured frames a cell has no quiet level of its own.
constexpr size_t kMinFramesForQuiet = 8;

class BoilingMetric final : public Metric {
 public:
  const MetricDescriptor& descriptor() const override { return boiling_descriptor(); }
  bool needs_in_order() const override { return true; }
  // The residual needs only this pair: computed here, concurrently, into
  // the pair's scratch, and taken over in observe_in_order.
  void measure_pair(const FramePair& pair, std::span<double>) const override {
    Residual& r = pair.scratch.slot<Residual>(this);
    compute_residual(pair.cur->bgr, pair.warped_prev_bgr, r.values, r.warped_scaled);
    r.frame_index = pair.cur->index;
    r.t_s = pair.cur->t_s;
  }

  void observe_in_order(const FramePair& pair, std::span<double> out) override {
    // Buffers rotate: the pair's scratch takes the one before last, so the
    // steady state allocates nothing.
    std::swap(residual_, previous_residual_);
    Residual& r = pair.scratch.slot<Residual>(this);
    if (r.frame_index == pair.cur->index && r.t_s == pair.cur->t_s) {
      std::swap(residual_, r.values);
      r.frame_index = -1;  // taken
    } else {
      compute_residual(pair.cur->bgr, pair.warped_prev_bgr, residual_, warped_scaled_);
    }
    if (has_previous_ && previous_residual_.size() == residual_.size()) {
      std::vector<double> cells = cell_statistics(residual_, pair.valid, pair.flow_backward);
      out[0] = excess_of_worst_cell(cells, {});
      cells_by_frame_.emplace_back(pair.cur->index, std::move(cells));
    }
    has_previous_ = true;
    pair.valid.copyTo(previous_valid_);
  }

  // Across a cut there is no motion to compensate; the frame after it would
  // still compare with a residual from across it.
  void finish(Report& report) override {
    MetricSeries* s = report.find_series("boiling");
    if (!s) return;
    const std::vector<double> quiet = quiet_levels();
    for (const auto& [frame, cells] : cells_by_frame_)
      if (frame >= 0 && frame < static_cast<int64_t>(s->values.size()))
        s->values[static_cast<size_t>(frame)] = excess_of_worst_cell(cells, quiet);
    clear_across_boundaries(s->values, shot_boundaries(report), 2);
  }

 private:
  // Bilinear sample of the earlier residual at (x, y); false outside it or
  // where the nearest earlier pixel failed the check.
  bool carried_residual(float x, float y, cv::Vec3f& out) const {
    const cv::Mat& r = previous_residual_;
    if (!(x >= 0 && y >= 0 && x <= r.cols - 1 && y <= r.rows - 1)) return false;
    if (!previous_valid_.at<uint8_t>(cvRound(y), cvRound(x))) return false;
    const int x0 = std::min(static_cast<int>(x), r.cols - 2 < 0 ? 0 : r.cols - 2);
    const int y0 = std::min(static_cast<int>(y), r.rows - 2 < 0 ? 0 : r.rows - 2);
    const int x1 = std::min(x0 + 1, r.cols - 1), y1 = std::min(y0 + 1, r.rows - 1);
    const float fx = x - static_cast<float>(x0), fy = y - static_cast<float>(y0);
    const cv::Vec3f* a = r.ptr<cv::Vec3f>(y0);
    const cv::Vec3f* b = r.ptr<cv::Vec3f>(y1);
    out = (a[x0] * (1 - fx) + a[x1] * fx) * (1 - fy) + (b[x0] * (1 - fx) + b[x1] * fx) * fy;
    return true;
  }

  // Every second pixel of every second row: a cell of 64 x 64 px still
  // averages about a thousand products, and the serial in-order stage
  // does a quarter of the work.
  static constexpr int kStride = 2;

  // Each cell's c (NaN where too few pixels were measured), in raster order.
  std::vector<double> cell_statistics(const cv::Mat& residual, const cv::Mat& valid,
                                      const cv::Mat& flow_backward) {
    const int cell = std::max(8, std::max(residual.cols, residual.rows) / kCellsPerLongSide);
    const int cols = (residual.cols + cell - 1) / cell, rows = (residual.rows + cell - 1) / cell;
    // Each column's cell, looked up rather than divided per pixel.
    cell_of_column_.resize(residual.cols);
    for (int x = 0; x < residual.cols; ++x) cell_of_column_[x] = x / cell;
    std::vector<double> sum(static_cast<size_t>(cols) * rows, 0.0);
    std::vector<int> count(sum.size(), 0), area(sum.size(), 0);
    cv::Vec3f before;
    for (int y = 0; y < residual.rows; y += kStride) {
      const cv::Vec3f* now = residual.ptr<cv::Vec3f>(y);
      const cv::Vec2f* flow = flow_backward.ptr<cv::Vec2f>(y);
      const uint8_t* ok_now = valid.ptr<uint8_t>(y);
      const size_t row_base = static_cast<size_t>(y / cell) * cols;
      for (int x = 0; x < residual.cols; x += kStride) {
        const size_t c = row_base + static_cast<size_t>(cell_of_column_[x]);
        ++area[c];
        // The earlier residual, carried onto this frame along the flow.
        if (!ok_now[x] || !carried_residual(static_cast<float>(x) + flow[x][0],
                                            static_cast<float>(y) + flow[x][1], before))
          continue;
        sum[c] -= now[x].dot(before);
        ++count[c];
      }
    }
    std::vector<double> cells(sum.size(), kUndefined);
    for (size_t c = 0; c < sum.size(); ++c)
      if (count[c] > 0 && count[c] >= kMinValidShare * area[c]) cells[c] = sum[c] / count[c];
    return cells;
  }

  // The worst cell's excess over its quiet level (0 where `quiet` is empty
  // or has no level for it) minus the median cell's; undefined with fewer
  // than two measured cells.
  static double excess_of_worst_cell(const std::vector<double>& cells,
                                     const std::vector<double>& quiet) {
    std::vector<double> excess;
    for (size_t c = 0; c < cells.size(); ++c)
      if (!std::isnan(cells[c]))
        excess.push_back(cells[c] - (c < quiet.size() && !std::isnan(quiet[c]) ? quiet[c] : 0.0));
    if (excess.size() < 2) return kUndefined;
    const double worst = *std::max_element(excess.begin(), excess.end());
    const auto middle = excess.begin() + static_cast<std::ptrdiff_t>(excess.size() / 2);
    std::nth_element(excess.begin(), middle, excess.end());
    return std::max(0.0, worst - *middle);
  }

  // Per cell, the lower quartile of its values over the clip (NaN for a
  // cell never measured). With fewer than kMinFramesForQuiet values there
  // is no telling a steady level from a defect: no quiet level then.
  std::vector<double> quiet_levels() const {
    if (cells_by_frame_.size() < kMinFramesForQuiet) return {};
    const size_t n = cells_by_frame_.front().second.size();
    std::vector<double> quiet(n, kUndefined), values;
    for (size_t c = 0; c < n; ++c) {
      values.clear();
      for (const auto& [frame, cells] : cells_by_frame_)
        if (c < cells.size() && !std::isnan(cells[c])) values.push_back(cells[c]);
      if (values.size() < kMinFramesForQuiet) continue;
      const auto q = values.begin() + static_cast<std::ptrdiff_t>(values.size() / 4);
      std::nth_element(values.begin(), q, values.end());
      quiet[c] = std::max(0.0, *q);
    }
    return quiet;
  }

  // r = V_t - W(V_{t-1}) with 8-bit values scaled to [0,1]: each term
  // scaled as convertTo(CV_32F, 1/255) scales it (a float product), then
  // subtracted. OpenCV's vectorized passes give exactly the values of a
  // per-element loop, at a fraction of the cost. `warped_scaled` is scratch.
  // Done in bands of rows, so the scratch holds a band, not a frame.
  static void compute_residual(const cv::Mat& cur, const cv::Mat& warped, cv::Mat& residual,
                               cv::Mat& warped_scaled) {
    constexpr int kBand = 32;
    residual.create(cur.size(), CV_32FC3);
    warped_scaled.create(std::min(kBand, cur.rows), cur.cols, CV_32FC3);
    for (int y = 0; y < cur.rows; y += kBand) {
      const cv::Range rows(y, std::min(cur.rows, y + kBand));
      cv::Mat out = residual.rowRange(rows);
      cv::Mat band = warped_scaled.rowRange(0, rows.size());
      cur.rowRange(rows).convertTo(out, CV_32F, 1.0 / 255.0);
      warped.rowRange(rows).convertTo(band, CV_32F, 1.0 / 255.0);
      cv::subtract(out, band, out);
    }
    cv::blur(residual, residual, cv::Size(3, 3), cv::Point(-1, -1), cv::BORDER_REPLICATE);
  }

  struct Residual {
    cv::Mat values;  // CV_32FC3
    cv::Mat warped_scaled;  // scratch of compute_residual (one band)
    int64_t frame_index = -1;  // which frame's residual it holds; -1: none
    double t_s = 0;
  };

  bool has_previous_ = false;
  std::vector<std::pair<int64_t, std::vector<double>>> cells_by_frame_;  // frame, cell statistics
  cv::Mat residual_, previous_residual_, previous_valid_, warped_scaled_;
  std::vector<int> cell_of_column_;  // scratch
};

}  // namespace

std::unique_ptr<Metric> make_boiling_metric(const AnalysisSettings&) {
  return std::make_unique<BoilingMetric>();
}

}  // namespace clipwarden
