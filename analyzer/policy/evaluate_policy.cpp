// The verdict of a finished report: each rule of the policy that fires adds
// a reason naming the metric, the value, the threshold and where in the clip
// it happens; the verdict is the most severe level among them.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <utility>

#include "analyzer/policy/plain_words.h"
#include "analyzer/policy/timestamp_gaps.h"
#include "clipwarden/policy.h"

namespace clipwarden {
namespace {

struct Finding {
  Severity level;
  std::string text;
};

// Three significant digits, plain notation for the usual ranges.
std::string num(double v) {
  char buf[32];
  if (v == 0) return "0";
  if (std::fabs(v) >= 100)
    std::snprintf(buf, sizeof buf, "%.0f", v);
  else
    std::snprintf(buf, sizeof buf, "%.3g", v);
  return buf;
}

double frame_time_s(const Report& r, int64_t frame) {
  if (frame >= 0 && static_cast<size_t>(frame) < r.frame_times_s.size())
    return r.frame_times_s[frame];
  return r.clip.fps > 0 ? static_cast<double>(frame) / r.clip.fps : 0;
}

double clip_duration_s(const Report& r) {
  if (r.summary.stream.video_duration_s > 0) return r.summary.stream.video_duration_s;
  if (r.clip.duration_s > 0) return r.clip.duration_s;
  return r.frame_times_s.empty() ? 0 : r.frame_times_s.back();
}

std::string two_decimals(double s) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.2f", s);
  return buf;
}

// "(frames 12-40, 0.50-1.67 s)" or "(frame 12, 0.50 s)".
std::string frame_range(const Report& r, int64_t first, int64_t last) {
  if (first == last)
    return "(frame " + std::to_string(first) + ", " + two_decimals(frame_time_s(r, first)) + " s)";
  return "(frames " + std::to_string(first) + "-" + std::to_string(last) + ", " +
         two_decimals(frame_time_s(r, first)) + "-" + two_decimals(frame_time_s(r, last)) + " s)";
}

std::string whole_clip(const Report& r) {
  return "(whole clip, 0.00-" + two_decimals(clip_duration_s(r)) + " s)";
}

// The first and last frame where `pred` holds on the series ({-1, -1}: none).
template <class Pred>
std::pair<int64_t, int64_t> span_where(const Report& r, const std::string& metric, Pred pred) {
  const MetricSeries* s = r.find_series(metric);
  int64_t first = -1, last = -1;
  if (s)
    for (size_t i = 0; i < s->values.size(); ++i)
      if (is_defined(s->values[i]) && pred(s->values[i])) {
        if (first < 0) first = static_cast<int64_t>(i);
        last = static_cast<int64_t>(i);
      }
  return {first, last};
}

// Frames where `pred` holds on the series, as a range text.
template <class Pred>
std::string where(const Report& r, const std::string& metric, Pred pred) {
  const auto [first, last] = span_where(r, metric, pred);
  return first < 0 ? whole_clip(r) : frame_range(r, first, last);
}

// A segment lasts from its first frame to the end of its last frame's
// interval (the next frame's time, or one nominal interval at the clip end).
double segment_duration_s(const Report& r, const Segment& s) {
  double end = s.end_s;
  const auto next = static_cast<size_t>(s.end_frame + 1);
  if (next < r.frame_times_s.size())
    end = r.frame_times_s[next];
  else if (r.clip.fps > 0)
    end += 1.0 / r.clip.fps;
  return std::max(0.0, end - s.start_s);
}

std::vector<const Segment*> segments_of(const Report& r, const std::string& metric) {
  std::vector<const Segment*> out;
  for (const auto& s : r.segments)
    if (s.metric == metric) out.push_back(&s);
  return out;
}

// The value of one statistic and the place it refers to; nullopt when the
// report does not have it (metric not measured).
struct Measured {
  double value;
  std::string place;
  int64_t first = -1, last = -1;  // frames the place covers; -1: the whole clip
  int count = 1;                  // stretches it covers
};

// ": what was seen", or "" when the metric has no wording.
std::string seen(const Report& r, const std::string& metric, int64_t first, int64_t last,
                 int count) {
  if (first < 0) first = 0, last = static_cast<int64_t>(r.frame_times_s.size()) - 1;
  const std::string words = plain_words(r, metric, first, last, count);
  return words.empty() ? "" : ": " + words;
}

std::optional<double> details_number(const Report& r, const std::string& metric,
                                     const std::string& key) {
  if (!r.summary.details.contains(metric)) return std::nullopt;
  const nlohmann::json* node = &r.summary.details[metric];
  size_t start = 0;
  while (start <= key.size()) {
    const size_t dot = std::min(key.find('.', start), key.size());
    const std::string part = key.substr(start, dot - start);
    if (!node->is_object() || !node->contains(part)) return std::nullopt;
    node = &(*node)[part];
    start = dot + 1;
  }
  if (node->is_boolean()) return node->get<bool>() ? 1.0 : 0.0;
  if (!node->is_number()) return std::nullopt;
  return node->get<double>();
}

std::optional<Measured> measure(const Report& r, const SummaryRule& rule, double threshold) {
  const std::string& stat = rule.statistic;
  if (stat.rfind("details.", 0) == 0) {
    auto v = details_number(r, rule.metric, stat.substr(8));
    if (!v) return std::nullopt;
    return Measured{*v, whole_clip(r), -1, -1, 1};
  }
  if (stat == "segment_count" || stat == "longest_segment_s" || stat == "segment_total_s") {
    auto segs = segments_of(r, rule.metric);
    if (segs.empty())
      return r.find_series(rule.metric) ? std::optional<Measured>(Measured{0, whole_clip(r)})
                                        : std::nullopt;
    if (stat == "longest_segment_s") {
      auto longest = *std::max_element(segs.begin(), segs.end(), [&](auto a, auto b) {
        return segment_duration_s(r, *a) < segment_duration_s(r, *b);
      });
      return Measured{segment_duration_s(r, *longest),
                      frame_range(r, longest->start_frame, longest->end_frame),
                      longest->start_frame, longest->end_frame, 1};
    }
    double total = 0;
    for (auto* s : segs) total += segment_duration_s(r, *s);
    const std::string place = frame_range(r, segs.front()->start_frame, segs.back()->end_frame);
    return Measured{stat == "segment_count" ? static_cast<double>(segs.size()) : total, place,
                    segs.front()->start_frame, segs.back()->end_frame,
                    static_cast<int>(segs.size())};
  }
  const MetricSummary* m = r.find_summary(rule.metric);
  if (!m) return std::nullopt;
  const double v = stat == "mean"  ? m->mean
                   : stat == "p50" ? m->p50
                   : stat == "p95" ? m->p95
                                   : m->max;
  if (!is_defined(v)) return std::nullopt;
  const auto [first, last] = span_where(r, rule.metric, [&](double x) { return x >= threshold; });
  return Measured{v, first < 0 ? whole_clip(r) : frame_range(r, first, last), first, last, 1};
}

void check_summary_rules(const Report& r, const Policy& p, std::vector<Finding>& out) {
  for (const auto& rule : p.rules) {
    const bool rejects = rule.reject.has_value();
    const double first_threshold = rejects ? *rule.reject : rule.review.value_or(0);
    auto m = measure(r, rule, first_threshold);
    if (!m) continue;
    Severity level;
    double threshold;
    if (rule.reject && m->value >= *rule.reject) {
      level = Severity::reject, threshold = *rule.reject;
    } else if (rule.review && m->value >= *rule.review) {
      level = Severity::review, threshold = *rule.review;
      if (rejects) m = measure(r, rule, threshold);  // place where the review level is reached
    } else {
      continue;
    }
    out.push_back({level, rule.metric + " " + rule.statistic + " " + num(m->value) +
                              " >= " + to_string(level) + " " + num(threshold) + " " + m->place +
                              seen(r, rule.metric, m->first, m->last, m->count)});
  }
}

// One reason per metric: its most severe segments, led by the highest peak.
void check_segments(const Report& r, const Policy& p, std::vector<Finding>& out) {
  std::vector<std::string> metrics;
  for (const auto& s : r.segments)
    if (s.severity != Severity::info &&
        std::find(metrics.begin(), metrics.end(), s.metric) == metrics.end())
      metrics.push_back(s.metric);
  for (const auto& metric : metrics) {
    auto segs = segments_of(r, metric);
    Severity level = Severity::review;
    for (auto* s : segs) level = std::max(level, s->severity);
    const Segment* worst = nullptr;
    int count = 0;
    for (auto* s : segs)
      if (s->severity == level) {
        ++count;
        if (!worst || s->peak > worst->peak) worst = s;
      }
    std::string text = metric + " segment peak " + num(worst->peak);
    auto rule = p.segments.find(metric);
    const double threshold = rule == p.segments.end()    ? NAN
                             : level == Severity::reject ? rule->second.reject_peak
                                                         : rule->second.review_peak;
    if (std::isfinite(threshold) && worst->peak >= threshold)
      text += " >= " + std::string(to_string(level)) + " " + num(threshold);
    else
      text += std::string(" (") + to_string(level) + " severity)";
    text += " " + frame_range(r, worst->start_frame, worst->end_frame);
    if (count > 1)
      text += ", " + std::to_string(count) + " " + to_string(level) + " segments in all";
    text += seen(r, metric, worst->start_frame, worst->end_frame, 1);
    out.push_back({level, text});
  }
}

// WCAG 2.x: more than three general or red flashes in any one-second period.
void check_flash(const Report& r, const Policy& p, std::vector<Finding>& out) {
  if (!p.flash_hazard_rejects) return;
  const MetricSeries* s = r.find_series("flash");
  double worst = 0;
  if (s)
    for (double v : s->values)
      if (is_defined(v)) worst = std::max(worst, v);
  const bool hazard_detail = details_number(r, "flash", "hazard").value_or(0) > 0;
  if (worst <= 3 && !hazard_detail) return;
  std::string text = "flash hazard: ";
  text += worst > 3 ? num(worst) + " flashes in one second > 3"
                    : std::string("flagged by the flash metric");
  text += " (WCAG 2.x three-flash threshold) " + where(r, "flash", [](double v) { return v > 3; }) +
          "; a screening aid, not a certification";
  out.push_back({Severity::reject, text});
}

void check_stream(const Report& r, const Policy& p, std::vector<Finding>& out) {
  const StreamFacts& st = r.summary.stream;
  if (p.stream_mismatch_review_s && st.mismatch_s && *st.mismatch_s >= *p.stream_mismatch_review_s)
    out.push_back({Severity::review, "stream audio/video duration mismatch " +
                                         two_decimals(*st.mismatch_s) + " s >= review " +
                                         num(*p.stream_mismatch_review_s) + " s (video " +
                                         two_decimals(st.video_duration_s) + " s, audio " +
                                         two_decimals(st.audio_duration_s.value_or(0)) + " s)"});
  if (p.dropped_frames_review && st.dropped_frames >= *p.dropped_frames_review) {
    // Only gaps across which the picture jumps count (timestamp_gaps.h), and
    // never more than the stream itself is missing: a file storing each
    // picture several times has its repeats left out of the analysed frames,
    // which leaves gaps between them that the stream does not have.
    int visible = 0;
    int64_t first = -1, last = -1;
    for (const TimestampGap& g : timestamp_gaps(r)) {
      if (!g.picture_jumps) continue;
      visible += g.missing;
      if (first < 0) first = g.frame;
      last = g.frame;
    }
    visible = std::min(visible, st.dropped_frames);
    if (visible >= *p.dropped_frames_review)
      out.push_back(
          {Severity::review, "stream dropped_frames " + std::to_string(visible) + " >= review " +
                                 std::to_string(*p.dropped_frames_review) + " " +
                                 (first < 0 ? whole_clip(r) : frame_range(r, first, last))});
  }
  // Pixels the decoder had to conceal or drop are not what the author made,
  // however coherent they look (damage often shows as a smear that stays
  // still, which no motion metric flags).
  if (p.decode_warnings_review &&
      st.decode_errors + st.concealed_frames + st.lost_frames > 0)
    out.push_back({Severity::review, "stream decoder reported damage: decode_errors " +
                                         std::to_string(st.decode_errors) + ", concealed_frames " +
                                         std::to_string(st.concealed_frames) + ", lost_frames " +
                                         std::to_string(st.lost_frames) + " " + whole_clip(r)});
}

void check_coherence(const Report& r, const Policy& p, std::vector<Finding>& out) {
  const double c = r.summary.coherence;
  if (p.coherence_reject_below && c < *p.coherence_reject_below)
    out.push_back({Severity::reject, "coherence " + num(c) + " < reject floor " +
                                         num(*p.coherence_reject_below) + " " + whole_clip(r)});
  else if (p.coherence_review_below && c < *p.coherence_review_below)
    out.push_back({Severity::review, "coherence " + num(c) + " < review floor " +
                                         num(*p.coherence_review_below) + " " + whole_clip(r)});
}

}  // namespace

std::optional<double> rule_statistic(const Report& report, const SummaryRule& rule) {
  auto m = measure(report, rule, 0);  // the threshold only places the reason's frames
  return m ? std::optional<double>(m->value) : std::nullopt;
}

VerdictResult evaluate_policy(const Report& report, const Policy& policy) {
  std::vector<Finding> findings;
  check_flash(report, policy, findings);
  check_segments(report, policy, findings);
  check_summary_rules(report, policy, findings);
  check_stream(report, policy, findings);
  check_coherence(report, policy, findings);
  // Most severe first; within a level, the order above (hard rules first).
  std::stable_sort(findings.begin(), findings.end(),
                   [](const Finding& a, const Finding& b) { return a.level > b.level; });
  VerdictResult out;
  for (const auto& f : findings) {
    if (f.level == Severity::reject) out.status = Verdict::reject;
    if (f.level == Severity::review && out.status == Verdict::pass) out.status = Verdict::review;
    out.reasons.push_back(f.text);
  }
  return out;
}

}  // namespace clipwarden
