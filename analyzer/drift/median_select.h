// The median (the element of rank n/2, the value std::nth_element puts in
// the middle) of values whose median is roughly known in advance, as in the
// robust illumination fit's iterations, where the residual scale changes
// little from one pass to the next.
#pragma once

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <vector>

namespace framelint::drift {

// One pass counts the values below 0.8 * hint and gathers those in
// [0.8, 1.25) * hint; when rank n/2 falls among the gathered ones, only
// they are searched (typically a fifth of the values). Otherwise (no hint,
// hint <= 0, or a poor one) all of `v` is searched. Either way the result
// is the same value: the k-th smallest of `v`, which the values below the
// bracket and the bracket's own order determine. `v` may be reordered;
// `bracket` is scratch. NaN values are not supported (as with
// std::nth_element).
inline float median_near(std::vector<float>& v, float hint, std::vector<float>& bracket) {
  if (v.empty()) return 0;
  const size_t k = v.size() / 2;
  if (hint > 0 && std::isfinite(hint)) {
    const float lo = hint * 0.8f, hi = hint * 1.25f;
    size_t below = 0;
    bracket.clear();
    for (const float x : v) {
      if (x < lo) {
        ++below;
      } else if (x < hi) {
        bracket.push_back(x);
      }
    }
    if (below <= k && k < below + bracket.size()) {
      const auto mid = bracket.begin() + static_cast<std::ptrdiff_t>(k - below);
      std::nth_element(bracket.begin(), mid, bracket.end());
      return *mid;
    }
  }
  const auto mid = v.begin() + static_cast<std::ptrdiff_t>(k);
  std::nth_element(v.begin(), mid, v.end());
  return *mid;
}

}  // namespace framelint::drift
