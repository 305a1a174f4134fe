#include "analyzer/metrics/light_excursions.h"

#include <algorithm>
#include <cmath>

namespace clipwarden {
namespace {

struct Excursion {
  size_t first = 0, last = 0;  // frames, inclusive
  double peak = 0;             // largest |value|
};

std::vector<Excursion> excursions_of(std::span<const double> v, double min_level) {
  std::vector<Excursion> out;
  bool open = false;
  int sign = 0;
  for (size_t t = 0; t < v.size(); ++t) {
    const bool in = !std::isnan(v[t]) && std::fabs(v[t]) >= min_level;
    const int s = in ? (v[t] > 0 ? 1 : -1) : 0;
    if (open && (!in || s != sign)) open = false;
    if (!in) continue;
    if (!open) {
      out.push_back({t, t, 0});
      open = true;
      sign = s;
    }
    out.back().last = t;
    out.back().peak = std::max(out.back().peak, std::fabs(v[t]));
  }
  return out;
}

}  // namespace

std::vector<bool> lone_excursion_frames(std::span<const double> signed_values,
                                        std::span<const double> times_s, const ExcursionRule& rule) {
  const size_t n = std::min(signed_values.size(), times_s.size());
  std::vector<bool> lone(signed_values.size(), false);
  const std::vector<Excursion> found = excursions_of(signed_values.first(n), rule.min_level);
  for (size_t i = 0; i < found.size(); ++i) {
    const Excursion& e = found[i];
    const double needed = std::max(rule.min_level, rule.comparable_share * e.peak);
    bool repeated = false;
    for (size_t j = 0; j < found.size() && !repeated; ++j) {
      // Comparable both ways: a small rebound after a dip does not make
      // the dip a repetition, nor the dip the rebound.
      if (j == i || found[j].peak < needed || e.peak < rule.comparable_share * found[j].peak) continue;
      const Excursion& o = found[j];
      const double gap_s = o.first > e.last ? times_s[o.first] - times_s[e.last]
                                            : times_s[e.first] - times_s[o.last];
      repeated = gap_s <= rule.within_s;
    }
    if (!repeated)
      for (size_t t = e.first; t <= e.last; ++t) lone[t] = true;
  }
  return lone;
}

}  // namespace clipwarden
