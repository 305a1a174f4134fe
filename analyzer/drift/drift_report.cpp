#include "analyzer/drift/drift_report.h"

#include <algorithm>
#include <cmath>
#include <map>

namespace clipwarden::drift {
namespace {

constexpr double kSamplesPerSecond = 8;
constexpr size_t kMaxSamples = 240;

// Rounded to the report's precision for the value; NaN stays NaN (null).
double rounded(double v, double unit) {
  if (!std::isfinite(v)) return kUndefined;
  return std::round(v / unit) * unit;
}


// Where a stretch of drift began: the last sample before it reached the
// enter level at which the drift was still at its baseline (the median
// since the previous stretch, plus 0.05). A slow departure is reported from
// its onset, not from the moment it crossed the enter level.
size_t onset(const std::vector<ObjectSample>& h, size_t floor_from, size_t crossing) {
  std::vector<double> before;
  for (size_t i = floor_from; i < crossing; ++i) {
    if (std::isfinite(h[i].drift)) before.push_back(h[i].drift);
  }
  if (before.empty()) return crossing;
  std::nth_element(before.begin(), before.begin() + static_cast<std::ptrdiff_t>(before.size() / 2),
                   before.end());
  const double baseline = before[before.size() / 2] + 0.05;
  for (size_t i = crossing; i-- > floor_from;) {
    if (std::isfinite(h[i].drift) && h[i].drift <= baseline) return i;
  }
  return floor_from;
}

// Indices into the history to write out: about kSamplesPerSecond per second,
// at most kMaxSamples, always the first, the last and the peak.
std::vector<size_t> sample_indices(const ObjectTrack& object, size_t peak) {
  const auto& h = object.history;
  std::vector<size_t> picked;
  if (h.empty()) return picked;
  const double span_s = h.back().t_s - h.front().t_s;
  const double rate = span_s > 0 ? (h.size() - 1) / span_s : kSamplesPerSecond;
  size_t stride = std::max<size_t>(1, static_cast<size_t>(std::floor(rate / kSamplesPerSecond)));
  stride = std::max(stride, (h.size() + kMaxSamples - 1) / kMaxSamples);
  for (size_t i = 0; i < h.size(); i += stride) picked.push_back(i);
  picked.push_back(h.size() - 1);
  picked.push_back(peak);
  std::sort(picked.begin(), picked.end());
  picked.erase(std::unique(picked.begin(), picked.end()), picked.end());
  return picked;
}

std::vector<DriftStretch> object_segments(const ObjectTrack& object, const ObjectSegmentRule& rule) {
  struct Stretch {
    size_t start = 0, end = 0, peak = 0;
  };
  std::vector<Stretch> found;
  const auto& h = object.history;
  bool open = false;
  Stretch cur;
  size_t floor_from = 0;  // where the previous stretch ended
  for (size_t i = 0; i < h.size(); ++i) {
    const double v = h[i].drift;
    if (!std::isfinite(v)) continue;  // hidden: neither opens nor closes
    if (!open && v >= rule.enter) {
      open = true;
      cur = {onset(h, floor_from, i), i, i};
    } else if (open && v < rule.leave) {
      open = false;
      found.push_back(cur);
      floor_from = i;
      continue;
    }
    if (open) {
      cur.end = i;
      if (v > h[cur.peak].drift) cur.peak = i;
    }
  }
  if (open) found.push_back(cur);
  std::vector<Stretch> merged;
  for (const auto& s : found) {
    if (!merged.empty() &&
        h[s.start].frame - h[merged.back().end].frame <= rule.merge_gap_frames + 1) {
      auto& last = merged.back();
      last.end = s.end;
      if (h[s.peak].drift > h[last.peak].drift) last.peak = s.peak;
    } else {
      merged.push_back(s);
    }
  }
  std::vector<DriftStretch> out;
  for (const auto& s : merged) {
    if (h[s.end].frame - h[s.start].frame + 1 < rule.min_frames) continue;
    out.push_back({h[s.start].frame, h[s.end].frame, rounded(h[s.start].t_s, 1e-4),
                   rounded(h[s.end].t_s, 1e-4), rounded(h[s.peak].drift, 1e-4), h[s.peak].frame,
                   report_name(h[s.peak].aspect)});
  }
  return out;
}

}  // namespace

const char* report_name(DriftAspect aspect) {
  switch (aspect) {
    case DriftAspect::colour: return "color";
    case DriftAspect::own_colour: return "own_color";
    case DriftAspect::quarter_colour: return "quarter_color";
    case DriftAspect::structure: return "structure";
    case DriftAspect::size: return "size";
    case DriftAspect::none: break;
  }
  return "";
}

double theil_sen_slope(const std::vector<double>& t, const std::vector<double>& y) {
  std::vector<double> slopes;
  const size_t n = std::min(t.size(), y.size());
  for (size_t i = 0; i < n; ++i) {
    if (!std::isfinite(y[i])) continue;
    for (size_t j = i + 1; j < n; ++j) {
      if (!std::isfinite(y[j]) || t[j] - t[i] <= 0) continue;
      slopes.push_back((y[j] - y[i]) / (t[j] - t[i]));
    }
  }
  if (slopes.empty()) return 0;
  auto mid = slopes.begin() + static_cast<std::ptrdiff_t>(slopes.size() / 2);
  std::nth_element(slopes.begin(), mid, slopes.end());
  return *mid;
}

TrackedObject to_tracked_object(const ObjectTrack& object, int frame_width, int frame_height,
                                const ObjectSegmentRule& rule) {
  TrackedObject out;
  out.id = object.id;
  out.first_frame = object.first_frame;
  out.last_frame = object.last_frame;
  out.vanished = object.vanished;
  out.end_reason = object.end_reason.empty() ? "clip_end" : object.end_reason;

  const auto& h = object.history;
  size_t peak = 0;
  for (size_t i = 0; i < h.size(); ++i) {
    if (std::isfinite(h[i].drift) && !(h[i].drift <= h[peak].drift)) peak = i;
  }
  out.kind = object.kind;
  out.reference_frame = object.first_frame;
  out.working_width = frame_width;
  out.working_height = frame_height;
  std::vector<double> t, drift_values, colour_values;
  const double w = std::max(1, frame_width), hgt = std::max(1, frame_height);
  for (size_t i : sample_indices(object, peak)) {
    const ObjectSample& s = h[i];
    TrackedSample look;
    look.frame = s.frame;
    look.box_px = {rounded(s.box.x, 0.1), rounded(s.box.y, 0.1), rounded(s.box.width, 0.1),
                   rounded(s.box.height, 0.1)};
    look.box_frac = {rounded(s.box.x / w, 1e-4), rounded(s.box.y / hgt, 1e-4),
                     rounded(s.box.width / w, 1e-4), rounded(s.box.height / hgt, 1e-4)};
    look.drift = rounded(s.drift, 1e-4);
    look.color_de00 = rounded(s.color_de00, 1e-3);
    look.own_color_de00 = rounded(s.own_colour_de00, 1e-3);
    look.structure = rounded(s.structure, 1e-4);
    look.size_pct = rounded(s.size_pct, 1e-2);
    look.size_window_pct = rounded(s.size_window_pct, 1e-2);
    look.visible_pct = rounded(100.0 * s.visible_fraction, 0.1);
    out.samples.push_back(look);
    t.push_back(s.t_s);
    drift_values.push_back(s.drift);
    colour_values.push_back(s.color_de00);
  }
  if (!h.empty()) {
    out.peak_drift = rounded(h[peak].drift, 1e-4);
    out.peak_frame = h[peak].frame;
  }
  out.drift_rate_per_s = rounded(theil_sen_slope(t, drift_values), 1e-4);
  out.color_de00_rate_per_s = rounded(theil_sen_slope(t, colour_values), 1e-3);
  out.drift_segments = object_segments(object, rule);
  return out;
}

nlohmann::json drift_summary(const std::vector<ObjectTrack>& objects) {
  std::map<std::string, int> ended;
  int moving = 0, vanished = 0, worst_id = 0;
  double worst = -1;
  for (const auto& o : objects) {
    moving += o.kind == ObjectKind::moving;
    vanished += o.vanished;
    ++ended[o.end_reason.empty() ? "clip_end" : o.end_reason];
    for (const auto& s : o.history) {
      if (std::isfinite(s.drift) && s.drift > worst) worst = s.drift, worst_id = o.id;
    }
  }
  nlohmann::json end_reasons = nlohmann::json::object();
  for (const auto& [reason, n] : ended) end_reasons[reason] = n;
  return {{"objects", objects.size()},
          {"moving_objects", moving},
          {"scene_objects", static_cast<int>(objects.size()) - moving},
          {"vanished", vanished},
          {"end_reasons", std::move(end_reasons)},
          {"worst_object", worst_id},
          {"peak_drift", worst < 0 ? nlohmann::json(nullptr) : nlohmann::json(rounded(worst, 1e-4))}};
}

}  // namespace clipwarden::drift
