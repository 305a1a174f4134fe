#include "analyzer/metrics/still_light_fit.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <limits>

#include <opencv2/imgproc.hpp>

namespace clipwarden {

void camera_warp(const cv::Mat& prev_luminance, const cv::Matx33d& camera_homography,
                 cv::Mat& warped, cv::Mat& valid) {
  // warpPerspective reads the source at H^-1 x for each destination x, as
  // the homography maps prev to cur.
  cv::warpPerspective(prev_luminance, warped, cv::Mat(camera_homography), prev_luminance.size(),
                      cv::INTER_LINEAR, cv::BORDER_REPLICATE);
  const cv::Mat inside(prev_luminance.size(), CV_8UC1, cv::Scalar(255));
  cv::warpPerspective(inside, valid, cv::Mat(camera_homography), prev_luminance.size(),
                      cv::INTER_NEAREST, cv::BORDER_CONSTANT, cv::Scalar(0));
  // The central differences below read each valid pixel's neighbours.
  cv::erode(valid, valid, cv::getStructuringElement(cv::MORPH_RECT, cv::Size(3, 3)),
            cv::Point(-1, -1), 1, cv::BORDER_CONSTANT, cv::Scalar(0));
}

namespace {

// Sums over a quarter's valid pixels of d = cur - w, w and the gradients
// gx, gy of w, and of their products. In double: a quarter holds up to a
// few thousand pixels.
struct FitSums {
  enum { d, w, x, y, count };
  double n = 0;
  std::array<double, count> s{};                     // sums
  std::array<std::array<double, count>, count> p{};  // sums of products (upper triangle used)

  void add(const std::array<double, count>& v) {
    n += 1;
    for (int i = 0; i < count; ++i) {
      s[i] += v[i];
      for (int j = i; j < count; ++j) p[i][j] += v[i] * v[j];
    }
  }
  // Centred cross-product of variables i and j.
  double centred(int i, int j) const {
    const double raw = i <= j ? p[i][j] : p[j][i];
    return raw - s[i] * s[j] / n;
  }
};

}  // namespace

std::vector<StillLightFit> block_still_light_fit(const cv::Mat& cur, const cv::Mat& warped,
                                                 const cv::Mat& valid, int cols, int rows,
                                                 float level_floor, float probe_px,
                                                 float probe_spread) {
  constexpr float kNaN = std::numeric_limits<float>::quiet_NaN();
  std::vector<StillLightFit> out(static_cast<size_t>(cols) * rows,
                                 StillLightFit{kNaN, kNaN, kNaN, false});
  const cv::Size size = cur.size();
  for (int by = 0; by < rows; ++by) {
    const int y0 = by * size.height / rows, y1 = (by + 1) * size.height / rows;
    for (int bx = 0; bx < cols; ++bx) {
      const int x0 = bx * size.width / cols, x1 = (bx + 1) * size.width / cols;
      const int ym = (y0 + y1) / 2, xm = (x0 + x1) / 2;
      std::array<FitSums, 4> quarters;
      for (int y = y0; y < y1; ++y) {
        const float* c = cur.ptr<float>(y);
        const float* w = warped.ptr<float>(y);
        const float* up = warped.ptr<float>(std::max(0, y - 1));
        const float* down = warped.ptr<float>(std::min(size.height - 1, y + 1));
        const uint8_t* v = valid.ptr<uint8_t>(y);
        for (int x = x0; x < x1; ++x) {
          if (!v[x]) continue;
          const double gx = 0.5 * (w[std::min(size.width - 1, x + 1)] - w[std::max(0, x - 1)]);
          const double gy = 0.5 * (down[x] - up[x]);
          quarters[(y >= ym ? 2 : 0) + (x >= xm ? 1 : 0)].add({double(c[x]) - w[x], w[x], gx, gy});
        }
      }
      double n = 0, sum_d = 0, sum_w = 0;
      // Pooled over the quarters, with each quarter's gain and offset
      // partialled out: the motion terms' normal matrix A, their
      // cross-products with d (b), and d's own sum of squares.
      double axx = 0, axy = 0, ayy = 0, bx_ = 0, by_ = 0, dd = 0;
      for (const FitSums& q : quarters) {
        if (q.n < 2) continue;
        n += q.n, sum_d += q.s[FitSums::d], sum_w += q.s[FitSums::w];
        const double sww = q.centred(FitSums::w, FitSums::w);
        const auto partial = [&](int i, int j) {
          const double sij = q.centred(i, j);
          return sww > 1e-12 ? sij - q.centred(i, FitSums::w) * q.centred(j, FitSums::w) / sww
                             : sij;
        };
        axx += partial(FitSums::x, FitSums::x), axy += partial(FitSums::x, FitSums::y);
        ayy += partial(FitSums::y, FitSums::y);
        bx_ += partial(FitSums::x, FitSums::d), by_ += partial(FitSums::y, FitSums::d);
        dd += partial(FitSums::d, FitSums::d);
      }
      const double area = static_cast<double>(y1 - y0) * (x1 - x0);
      if (n < 8 || 2 * n < area) continue;
      const double level = std::max<double>(level_floor, sum_w / n);
      // The weakest direction of the partialled gradients: a motion of
      // probe_px along it changes the fit by sqrt(lambda_min / n) * probe_px.
      const double half_trace = 0.5 * (axx + ayy);
      const double lambda_min =
          half_trace - std::sqrt(std::max(0.0, half_trace * half_trace - (axx * ayy - axy * axy)));
      const double probe_level = static_cast<double>(probe_spread) * level;
      const bool observable = lambda_min / n * probe_px * probe_px >= probe_level * probe_level;
      double u = 0, v = 0, residual = dd;
      if (observable) {
        const double det = axx * ayy - axy * axy;
        u = (ayy * bx_ - axy * by_) / det;
        v = (axx * by_ - axy * bx_) / det;
        residual = dd - (u * bx_ + v * by_);
      }
      out[static_cast<size_t>(by) * cols + bx] = {
          observable ? static_cast<float>(std::hypot(u, v)) : kNaN,
          static_cast<float>(std::sqrt(std::max(0.0, residual) / n) / level),
          static_cast<float>(sum_d / n / level), observable};
    }
  }
  return out;
}

}  // namespace clipwarden
