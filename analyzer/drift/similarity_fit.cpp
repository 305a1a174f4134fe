#include "analyzer/drift/similarity_fit.h"

#include <cmath>

namespace clipwarden::drift {
namespace {

// Least squares over the flagged points (all when `mask` is empty).
bool least_squares(std::span<const cv::Point2f> src, std::span<const cv::Point2f> dst,
                   const std::vector<uint8_t>* mask, Similarity& fit) {
  double n = 0, sx = 0, sy = 0, dx = 0, dy = 0;
  for (size_t i = 0; i < src.size(); ++i) {
    if (mask && !(*mask)[i]) continue;
    n += 1, sx += src[i].x, sy += src[i].y, dx += dst[i].x, dy += dst[i].y;
  }
  if (n < 2) return false;
  sx /= n, sy /= n, dx /= n, dy /= n;
  double num_a = 0, num_b = 0, den = 0;
  for (size_t i = 0; i < src.size(); ++i) {
    if (mask && !(*mask)[i]) continue;
    const double px = src[i].x - sx, py = src[i].y - sy;
    const double qx = dst[i].x - dx, qy = dst[i].y - dy;
    num_a += px * qx + py * qy;
    num_b += px * qy - py * qx;
    den += px * px + py * py;
  }
  if (den < 1e-9) return false;
  fit.a = num_a / den;
  fit.b = num_b / den;
  fit.tx = dx - (fit.a * sx - fit.b * sy);
  fit.ty = dy - (fit.b * sx + fit.a * sy);
  return true;
}

int count_inliers(std::span<const cv::Point2f> src, std::span<const cv::Point2f> dst,
                  const Similarity& s, float inlier_px, std::vector<uint8_t>* flags) {
  const float limit = inlier_px * inlier_px;
  int count = 0;
  for (size_t i = 0; i < src.size(); ++i) {
    const cv::Point2f d = s.apply(src[i]) - dst[i];
    const bool in = d.x * d.x + d.y * d.y <= limit;
    count += in;
    if (flags) (*flags)[i] = in;
  }
  return count;
}

}  // namespace

double Similarity::scale() const { return std::hypot(a, b); }
double Similarity::rotation_rad() const { return std::atan2(b, a); }

bool fit_similarity(std::span<const cv::Point2f> src, std::span<const cv::Point2f> dst,
                    float inlier_px, uint32_t seed, Similarity& fit, std::vector<uint8_t>& inliers,
                    int iterations) {
  const size_t n = std::min(src.size(), dst.size());
  inliers.assign(n, 0);
  if (n < 2) return false;
  src = src.first(n);
  dst = dst.first(n);
  Similarity best;
  int best_count = -1;
  uint32_t state = seed * 2654435761u + 1u;
  auto next = [&]() {  // xorshift32: cheap and deterministic
    state ^= state << 13, state ^= state >> 17, state ^= state << 5;
    return state;
  };
  for (int it = 0; it < iterations; ++it) {
    const size_t i = next() % n, j = next() % n;
    const double px = src[j].x - src[i].x, py = src[j].y - src[i].y;
    const double den = px * px + py * py;
    if (i == j || den < 1.0) continue;
    const double qx = dst[j].x - dst[i].x, qy = dst[j].y - dst[i].y;
    Similarity s;
    s.a = (px * qx + py * qy) / den;  // (q2 - q1) / (p2 - p1) as complex numbers
    s.b = (px * qy - py * qx) / den;
    s.tx = dst[i].x - (s.a * src[i].x - s.b * src[i].y);
    s.ty = dst[i].y - (s.b * src[i].x + s.a * src[i].y);
    const int count = count_inliers(src, dst, s, inlier_px, nullptr);
    if (count > best_count) best_count = count, best = s;
    // Only a strictly larger count replaces the best: with every point an
    // inlier the remaining samples cannot change the fit (a rigid object
    // or scene cell usually gets there within a few samples).
    if (best_count == static_cast<int>(n)) break;
  }
  if (best_count < 2) {
    // Degenerate sample set (e.g. all points coincide): translation only.
    if (!least_squares(src, dst, nullptr, best)) {
      best = Similarity{};
      best.tx = dst[0].x - src[0].x;
      best.ty = dst[0].y - src[0].y;
    }
  }
  count_inliers(src, dst, best, inlier_px, &inliers);
  Similarity refined = best;
  if (least_squares(src, dst, &inliers, refined)) {
    best = refined;
    count_inliers(src, dst, best, inlier_px, &inliers);
  }
  fit = best;
  return true;
}

}  // namespace clipwarden::drift
