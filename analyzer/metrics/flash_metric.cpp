// flash: photosensitive flash screening after WCAG 2.x (general flash and
// red flash thresholds; analyzer/flash/flash_detector.h says how).
// Per frame: the flashes in the one-second window ending at the frame,
// counted only where the area rule is met (more than 25% of a 10-degree
// field), for whichever of general and red flashes is worse. More than 3 is
// a hazard: hazard stretches become reject segments here, and
// summary.flash.details says how many flashes, where, which kind, and
// carries the screening caution, which also goes into the report's notes.
#include <algorithm>
#include <cmath>
#include <optional>

#include <opencv2/core.hpp>

#include "analyzer/flash/cell_means.h"
#include "analyzer/flash/flash_detector.h"
#include "analyzer/metrics/flash_metric.h"
#include "analyzer/metrics/metric.h"

namespace clipwarden {

// One rule per two lines reads as a table, so the formatter keeps out.
// clang-format off
const MetricDescriptor& flash_descriptor() {
  static const MetricDescriptor d{
      .name = "flash",
      .citation = "WCAG 2.x success criterion 2.3.1, general flash and red flash thresholds",
      .columns = {
          {.name = "flash",
           .unit = "flashes in the one-second window ending at the frame",
           .description = "General and red flashes as defined by WCAG 2.x, counted in a one-second window.",
           .better = Better::lower,
           .frame_rate = FrameRateDependence::per_second,
           .frame_rate_text = "flashes are counted per real second",
           // Counted only where the WCAG 2.x area rule is met
           // (docs/detectors.md). More than 3 is the WCAG general/red flash
           // threshold: this metric itself writes those stretches as reject
           // segments (from the start of the first failing window) and the
           // policy's hard rule flash_hazard_rejects rejects the clip, so
           // there is no segment rule (it would only duplicate them).
           // Exactly 3 is allowed by WCAG but at the limit: review, a person
           // should look. Measured on opencv-doc footage: street scene
           // vtest.avi max 1, trailer Megamind.avi max 2.
           .default_rule = {std::nullopt, {{"max", 3, kOff}}},
           .catches = {"strobe"}},
      }};
  return d;
}
// clang-format on

const char* const kFlashCaution =
    "Flash screening is a screening aid, not a certification: it applies the WCAG 2.x general "
    "flash and red flash thresholds to the analysed frames. Broadcasters and platforms have their "
    "own rules, which take precedence. Flashing content can harm viewers with photosensitive "
    "epilepsy; when in doubt, have the clip assessed by a qualified reviewer.";

namespace {

class FlashMetric final : public Metric {
 public:
  const MetricDescriptor& descriptor() const override { return flash_descriptor(); }
  bool needs_in_order() const override { return true; }

  // The per-pixel part, the cell means of the current frame, is computed
  // here, concurrently; the per-cell trackers follow the frames serially.
  void measure_pair(const FramePair& pair, std::span<double>) const override {
    cells_of(*pair.cur, pair.scratch.slot<flash::CellMeans>(this));
  }

  void observe_in_order(const FramePair& pair, std::span<double> out) override {
    if (!detector_) {
      detector_.emplace(pair.prev->bgr.size());
      add(*pair.prev, first_cells_);
    }
    out[0] = add(*pair.cur, pair.scratch.slot<flash::CellMeans>(this));
  }

  void finish(Report& report) override {
    MetricSeries* series = report.find_series("flash");
    if (!series) return;
    // A one-frame clip never reaches observe_in_order: nothing can flash.
    if (frames_.empty() && !series->values.empty()) frames_.push_back({});
    for (size_t i = 0; i < series->values.size() && i < frames_.size(); ++i)
      series->values[i] = frames_[i].flashes();
    add_hazard_segments(report);
    report.summary.details["flash"] = details(report);
    // The caution is for clips that flash: on every report it would be read
    // as boilerplate and skipped where it matters.
    const bool counted = std::any_of(series->values.begin(), series->values.end(),
                                     [](double flashes) { return flashes > 0; });
    if (counted) report.notes.push_back(kFlashCaution);
  }

 private:
  // Linear-light colour for the red rule: the linearised R, G, B of the
  // "relative luminance" definition, from the same table as luminance.
  static void cells_of(const FramePlanes& frame, flash::CellMeans& cells) {
    const cv::Size grid = flash::flash_grid(frame.bgr.size(), flash::kGridCellsPerAxis);
    flash::compute_cell_means(frame.luminance, frame.bgr, grid, cells);
    cells.frame_index = frame.index;
    cells.t_s = frame.t_s;
  }

  // `cells` may hold another frame's means (see PairScratch): then they are
  // computed here.
  double add(const FramePlanes& frame, flash::CellMeans& cells) {
    if (cells.frame_index != frame.index || cells.t_s != frame.t_s ||
        cells.luminance.size() != detector_->grid())
      cells_of(frame, cells);
    frames_.push_back(detector_->add_cells(frame.t_s, cells));
    return frames_.back().flashes();
  }

  // The first frame of the one-second window (t - 1 s, t] ending at frame i.
  size_t window_start(const Report& report, size_t i) const {
    const auto& t = report.frame_times_s;
    size_t j = i;
    while (j > 0 && t[j - 1] > t[i] - flash::kWindow_s + 1e-6) --j;
    return j;
  }

  // Where the flashing that makes frame i a hazard began. The window
  // (t - 1 s, t] may open on calm frames, so start instead at the first
  // frame of the window that already counts a flash, moved back by half a
  // flash period (1 s / 2n for n flashes in the window): a flash is counted
  // when its second transition completes, and its first came about half a
  // period earlier. Not before the window opens.
  size_t flashing_start(const Report& report, size_t i) const {
    const auto& t = report.frame_times_s;
    const size_t opens = window_start(report, i);
    size_t j = opens;
    while (j < i && frames_[j].flashes() == 0) ++j;
    const double first_transition_s = t[j] - flash::kWindow_s / (2.0 * std::max(1, frames_[i].flashes()));
    while (j > opens && t[j - 1] >= first_transition_s - 1e-9) --j;
    return j;
  }

  void add_hazard_segments(Report& report) const {
    const auto& t = report.frame_times_s;
    std::optional<Segment> open;
    for (size_t i = 0; i < frames_.size() && i < t.size(); ++i) {
      if (!frames_[i].hazard()) continue;
      const int64_t start = static_cast<int64_t>(flashing_start(report, i));
      if (open && start <= open->end_frame + 1) {
        open->end_frame = static_cast<int64_t>(i);
      } else {
        if (open) report.segments.push_back(*open);
        open = Segment{"flash", start, static_cast<int64_t>(i), 0, 0, 0, 0, Severity::reject};
      }
      if (frames_[i].flashes() > open->peak) {
        open->peak = frames_[i].flashes();
        open->peak_frame = static_cast<int64_t>(i);
      }
    }
    if (open) report.segments.push_back(*open);
    for (auto& s : report.segments) {
      if (s.metric != "flash") continue;
      s.start_s = t[s.start_frame];
      s.end_s = t[s.end_frame];
    }
  }

  nlohmann::json details(const Report& report) const {
    size_t worst = 0;
    int general = 0, red = 0;
    for (size_t i = 0; i < frames_.size(); ++i) {
      general = std::max(general, frames_[i].general_flashes);
      red = std::max(red, frames_[i].red_flashes);
      if (frames_[i].flashes() > frames_[worst].flashes()) worst = i;
    }
    double hazard_s = 0;
    int hazard_segments = 0;
    for (const auto& s : report.segments) {
      if (s.metric != "flash") continue;
      ++hazard_segments;
      hazard_s += s.end_s - s.start_s;
    }
    nlohmann::json out = {
        {"max_flashes_per_s", std::max(general, red)},
        {"general_max_flashes_per_s", general},
        {"red_max_flashes_per_s", red},
        {"kind", general == 0 && red == 0 ? nlohmann::json() : general >= red ? "general" : "red"},
        {"hazard", hazard_segments > 0},
        {"hazard_segments", hazard_segments},
        {"hazard_s", hazard_s},
        {"limit_flashes_per_s", flash::kMaxFlashesPerWindow},
        {"rule",
         "WCAG 2.x general flash and red flash thresholds: more than 3 flashes in any one-second "
         "period over more than 25% of a 10-degree field (341x256 px of a 1024x768 screen, scaled "
         "to the frame)"},
        {"caution", kFlashCaution}};
    if (detector_) {
      out["grid_cells"] = {detector_->grid().width, detector_->grid().height};
      out["field_cells"] = {detector_->field().width, detector_->field().height};
    }
    if (!frames_.empty() && frames_[worst].flashes() > 0 && worst < report.frame_times_s.size()) {
      const auto& f = frames_[worst];
      const cv::Rect2d field = f.general_flashes >= f.red_flashes ? f.general_field : f.red_field;
      const size_t start = window_start(report, worst);
      out["where"] = {{"start_frame", start},
                      {"end_frame", worst},
                      {"start_s", report.frame_times_s[start]},
                      {"end_s", report.frame_times_s[worst]},
                      {"field", {{"x", field.x}, {"y", field.y}, {"width", field.width},
                                 {"height", field.height}}}};
    }
    return out;
  }

  std::optional<flash::FlashDetector> detector_;
  std::vector<flash::FlashFrame> frames_;
  flash::CellMeans first_cells_;  // frame 0's
};

}  // namespace

std::unique_ptr<Metric> make_flash_metric(const AnalysisSettings&) {
  return std::make_unique<FlashMetric>();
}

}  // namespace clipwarden
