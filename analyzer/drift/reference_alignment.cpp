#include "analyzer/drift/reference_alignment.h"

#include <algorithm>
#include <cmath>

#include "analyzer/drift/sampling.h"

namespace clipwarden::drift {
namespace {

constexpr int kParams = 6;  // dx, dy, scale, rotation (about the centroid), gain, offset
constexpr int kAlignIterations = 3;
constexpr double kHuberDelta = 0.04;  // gray level in [0,1]
// Weight of the gain prior per point, in squared gray level per unit gain:
// a gain off by 0.2 costs as much as a 0.045 residual at every point.
constexpr double kGainPrior = 0.05;

}  // namespace

bool align_to_reference(const cv::Mat& gray, std::span<const cv::Point2f> positions,
                        std::span<const float> templates, const AlignmentLimits& limits,
                        Similarity& correction) {
  const size_t n = std::min(positions.size(), templates.size());
  if (n < 6 || gray.empty()) return false;
  cv::Point2d centre(0, 0);
  for (size_t i = 0; i < n; ++i) centre += cv::Point2d(positions[i]);
  centre *= 1.0 / static_cast<double>(n);
  double radius2 = 0;
  for (size_t i = 0; i < n; ++i) {
    const cv::Point2d q = cv::Point2d(positions[i]) - centre;
    radius2 += q.dot(q);
  }
  // Scale and rotation act on coordinates normalised by the RMS radius, so
  // all four geometric parameters are in pixels at the object's rim.
  const double radius = std::sqrt(radius2 / static_cast<double>(n));
  if (radius < 1) return false;
  double dx = 0, dy = 0, sc = 0, r = 0, gain = 1, offset = 0;
  auto warp = [&](cv::Point2f p) {
    const double qx = (p.x - centre.x) / radius, qy = (p.y - centre.y) / radius;
    return cv::Point2f(static_cast<float>(p.x + dx + sc * qx - r * qy),
                       static_cast<float>(p.y + dy + sc * qy + r * qx));
  };
  for (int iter = 0; iter < kAlignIterations; ++iter) {
    cv::Matx<double, kParams, kParams> h = cv::Matx<double, kParams, kParams>::zeros();
    cv::Vec<double, kParams> g = cv::Vec<double, kParams>::all(0);
    for (size_t i = 0; i < n; ++i) {
      const cv::Point2f p = warp(positions[i]);
      const double gx = 0.5 * (sample_gray(gray, {p.x + 1, p.y}) - sample_gray(gray, {p.x - 1, p.y}));
      const double gy = 0.5 * (sample_gray(gray, {p.x, p.y + 1}) - sample_gray(gray, {p.x, p.y - 1}));
      // Residual of I(warp(p)) against gain * T + offset.
      const double res = sample_gray(gray, p) - gain * templates[i] - offset;
      const double w = std::abs(res) <= kHuberDelta ? 1.0 : kHuberDelta / std::abs(res);
      const double qx = (positions[i].x - centre.x) / radius, qy = (positions[i].y - centre.y) / radius;
      const cv::Vec<double, kParams> j(gx, gy, gx * qx + gy * qy, -gx * qy + gy * qx,
                                       -templates[i], -1.0);
      // Upper triangle only (mirrored below): j_a j_b = j_b j_a exactly, so
      // the sums are those of the full outer product.
      for (int a = 0; a < kParams; ++a)
        for (int b = a; b < kParams; ++b) h(a, b) += w * (j[a] * j[b]);
      g += w * res * j;
    }
    for (int a = 0; a < kParams; ++a)
      for (int b = 0; b < a; ++b) h(a, b) = h(b, a);
    // Levenberg damping keeps untextured objects where the flow put them.
    for (int d = 0; d < 4; ++d) h(d, d) += 1e-3 * h(d, d) + 1e-9;
    // A prior holds the gain near 1: with the gain free, shrinking every
    // point onto a flat patch and setting the gain to 0 would match any
    // template (a degenerate fit that made walking people collapse).
    const double prior = kGainPrior * static_cast<double>(n);
    h(4, 4) += prior;
    g[4] += prior * (gain - 1.0);
    cv::Vec<double, kParams> step;
    if (!cv::solve(h, -g, step, cv::DECOMP_CHOLESKY)) return false;
    dx += step[0], dy += step[1], sc += step[2], r += step[3], offset += step[5];
    gain = std::clamp(gain + step[4], 0.5, 2.0);
  }
  if (!std::isfinite(dx + dy + sc + r)) return false;
  const double length = std::hypot(dx, dy);
  if (length > limits.max_shift_px) dx *= limits.max_shift_px / length, dy *= limits.max_shift_px / length;
  r = std::clamp<double>(r, -limits.max_rim_px, limits.max_rim_px);
  sc = std::clamp<double>(sc, -limits.max_scale_rim_px, limits.max_scale_rim_px);
  // p' = p + d + (sc q + r perp(q)) / R with q = p - c, as x' = [a -b; b a] x + t.
  correction.a = 1 + sc / radius;
  correction.b = r / radius;
  correction.tx = dx + centre.x - (correction.a * centre.x - correction.b * centre.y);
  correction.ty = dy + centre.y - (correction.b * centre.x + correction.a * centre.y);
  return true;
}

}  // namespace clipwarden::drift
