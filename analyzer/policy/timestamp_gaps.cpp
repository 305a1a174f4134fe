#include "analyzer/policy/timestamp_gaps.h"

#include <algorithm>
#include <cmath>

#include "analyzer/decode/stream_timing.h"
#include "analyzer/frame/series_math.h"

namespace clipwarden {
namespace {

constexpr int kNeighbourFrames = 10;
constexpr double kJumpFactor = 2;
constexpr double kJumpFloorPct = 1;

bool picture_jumps(const MetricSeries* occluded, const std::vector<bool>& in_gap, size_t frame) {
  if (!occluded || frame >= occluded->values.size() || std::isnan(occluded->values[frame]))
    return true;
  std::vector<double> around;
  const size_t from = frame > kNeighbourFrames ? frame - kNeighbourFrames : 1;
  const size_t to = std::min(occluded->values.size(), frame + kNeighbourFrames + 1);
  for (size_t j = from; j < to; ++j)
    if (j != frame && !in_gap[j] && !std::isnan(occluded->values[j]))
      around.push_back(occluded->values[j]);
  if (around.empty()) return true;
  const double usual = quantile(std::move(around), 0.5);
  const double at_gap = occluded->values[frame];
  return at_gap >= kJumpFactor * usual && at_gap >= usual + kJumpFloorPct;
}

}  // namespace

std::vector<TimestampGap> timestamp_gaps(const Report& r) {
  const auto& t = r.frame_times_s;
  std::vector<TimestampGap> gaps;
  if (t.size() < 3) return gaps;
  std::vector<double> dt;
  for (size_t i = 1; i < t.size(); ++i) dt.push_back(t[i] - t[i - 1]);
  const double nominal = quantile(dt, 0.5);
  std::vector<bool> in_gap(t.size(), false);
  for (size_t i = 1; i < t.size(); ++i) {
    const int missing = decode::missing_frames(dt[i - 1], nominal);
    if (missing == 0) continue;
    in_gap[i] = true;
    gaps.push_back({static_cast<int64_t>(i), missing, true});
  }
  const MetricSeries* occluded = r.find_series("occluded_pct");
  for (TimestampGap& g : gaps)
    g.picture_jumps = picture_jumps(occluded, in_gap, static_cast<size_t>(g.frame));
  return gaps;
}

}  // namespace clipwarden
