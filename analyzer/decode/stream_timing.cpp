#include "analyzer/decode/stream_timing.h"
#include "analyzer/frame/series_math.h"

#include <algorithm>
#include <cmath>

namespace clipwarden::decode {

int missing_frames(double interval, double nominal) {
  constexpr double kWholeMultipleTolerance = 0.25;
  if (!(nominal > 0) || !(interval > 0)) return 0;
  const double multiple = interval / nominal;
  const double whole = std::round(multiple);
  if (whole < 2 || std::fabs(multiple - whole) > kWholeMultipleTolerance) return 0;
  return static_cast<int>(whole) - 1;
}

StreamTiming::StreamTiming(double tick_s, double fallback_interval_s)
    : tick_s_(tick_s > 0 ? tick_s : 1.0),
      fallback_interval_ticks_(fallback_interval_s > 0 ? fallback_interval_s / tick_s_ : 0) {}

double StreamTiming::add(std::optional<int64_t> timestamp_ticks, int64_t duration_ticks) {
  if (!started_) {
    started_ = true;
    first_ = last_ = timestamp_ticks.value_or(0);
    last_duration_ = duration_ticks;
    return 0.0;
  }
  int64_t ts;
  if (timestamp_ticks) {
    ts = *timestamp_ticks;
  } else {
    const double step = intervals_.empty() ? fallback_interval_ticks_ : nominal_interval_ticks();
    ts = last_ + std::max<int64_t>(1, std::llround(step));
  }
  intervals_.push_back(ts - last_);
  last_ = ts;
  last_duration_ = duration_ticks;
  return static_cast<double>(ts - first_) * tick_s_;
}

double StreamTiming::nominal_interval_ticks() const {
  std::vector<int64_t> positive;
  positive.reserve(intervals_.size());
  for (int64_t d : intervals_)
    if (d > 0) positive.push_back(d);
  if (positive.empty()) return fallback_interval_ticks_;
  return static_cast<double>(upper_median_in_place(positive));
}

StreamFacts StreamTiming::facts() const {
  StreamFacts facts;
  if (!started_) return facts;
  const double nominal = nominal_interval_ticks();
  if (nominal > 0) {
    const double tolerance = 0.05 * nominal + (1.0 < 0.5 * nominal ? 1.0 : 0.0);
    for (int64_t d : intervals_) {
      if (d <= 0) {
        ++facts.duplicate_timestamps;
        continue;
      }
      if (std::abs(static_cast<double>(d) - nominal) > tolerance) facts.vfr = true;
      facts.dropped_frames += missing_frames(static_cast<double>(d), nominal);
    }
  } else {
    for (int64_t d : intervals_) facts.duplicate_timestamps += d <= 0;
  }
  const double last_duration = last_duration_ > 0 ? static_cast<double>(last_duration_) : nominal;
  facts.video_duration_s = (static_cast<double>(last_ - first_) + last_duration) * tick_s_;
  return facts;
}

}  // namespace clipwarden::decode
