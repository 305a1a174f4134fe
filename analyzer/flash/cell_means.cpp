#include "analyzer/flash/cell_means.h"

#include <algorithm>
#include <cfloat>
#include <cmath>

#include <opencv2/imgproc.hpp>

#include "analyzer/color/relative_luminance.h"

namespace clipwarden::flash {
namespace {

// OpenCV's area-resampling table for one axis (imgproc/src/resize.cpp,
// computeResizeAreaTab, OpenCV 4.x): destination cell d covers source
// [d * scale, (d + 1) * scale); a partly covered pixel weighs by the part
// covered; weights are divided by the cell's width. Entries come in order of
// d, then of the source pixel, as OpenCV accumulates them.
void area_tab(int source_size, int cells, double scale, CellMeans::Tab& tab) {
  tab.first.assign(1, 0);
  tab.source.clear();
  tab.weight.clear();
  auto add = [&](int s, float w) {
    tab.source.push_back(s);
    tab.weight.push_back(w);
  };
  for (int d = 0; d < cells; ++d) {
    const double f1 = d * scale, f2 = f1 + scale;
    const double width = std::min(scale, source_size - f1);
    int s1 = cvCeil(f1), s2 = cvFloor(f2);
    s2 = std::min(s2, source_size - 1);
    s1 = std::min(s1, s2);
    if (s1 - f1 > 1e-3) add(s1 - 1, static_cast<float>((s1 - f1) / width));
    for (int s = s1; s < s2; ++s) add(s, static_cast<float>(1.0 / width));
    if (f2 - s2 > 1e-3) add(s2, static_cast<float>(std::min(std::min(f2 - s2, 1.), width) / width));
    tab.first.push_back(static_cast<int>(tab.source.size()));
  }
}

// cv::resize takes another algorithm (block sums) when both scales are
// whole numbers; the tables above reproduce only the general one.
bool whole_scales(cv::Size from, cv::Size to) {
  const double sx = 1. / (static_cast<double>(to.width) / from.width);
  const double sy = 1. / (static_cast<double>(to.height) / from.height);
  return std::abs(sx - cv::saturate_cast<int>(sx)) < DBL_EPSILON &&
         std::abs(sy - cv::saturate_cast<int>(sy)) < DBL_EPSILON && from != to;
}

void prepare(CellMeans& out, cv::Size from, cv::Size grid) {
  out.luminance.create(grid, CV_32FC1);
  out.red.create(grid, CV_32FC1);
  out.green.create(grid, CV_32FC1);
  out.blue.create(grid, CV_32FC1);
  if (out.tab_from == from && out.tab_to == grid) return;
  // The scales as cv::resize derives them (from the inverse scale).
  area_tab(from.width, grid.width, 1. / (static_cast<double>(grid.width) / from.width), out.across);
  area_tab(from.height, grid.height, 1. / (static_cast<double>(grid.height) / from.height), out.down);
  out.tab_from = from;
  out.tab_to = grid;
  for (auto* v : {&out.row_r, &out.row_g, &out.row_b}) v->resize(from.width);
  for (auto* v : {&out.acc_l, &out.acc_r, &out.acc_g, &out.acc_b}) v->resize(grid.width);
}

}  // namespace

cv::Size flash_grid(cv::Size frame, int cells_per_axis) {
  return {std::clamp(frame.width, 1, cells_per_axis), std::clamp(frame.height, 1, cells_per_axis)};
}

void cell_means_of_linear(const cv::Mat& luminance, const cv::Mat& linear_bgr, cv::Size grid,
                          CellMeans& out) {
  cv::resize(luminance, out.luminance, grid, 0, 0, cv::INTER_AREA);
  cv::Mat colour;
  cv::resize(linear_bgr, colour, grid, 0, 0, cv::INTER_AREA);
  cv::Mat bgr[3] = {out.blue, out.green, out.red};
  cv::split(colour, bgr);
  out.blue = bgr[0], out.green = bgr[1], out.red = bgr[2];
}

void compute_cell_means(const cv::Mat& luminance, const cv::Mat& bgr8, cv::Size grid,
                        CellMeans& out) {
  CV_Assert(luminance.type() == CV_32FC1 && bgr8.type() == CV_8UC3 &&
            luminance.size() == bgr8.size());
  const cv::Size from = bgr8.size();
  const auto& lin = srgb8_to_linear_table();
  if (whole_scales(from, grid)) {
    cv::Mat linear;
    const cv::Mat table(1, 256, CV_32FC1, const_cast<float*>(lin.data()));
    cv::LUT(bgr8, table, linear);
    cell_means_of_linear(luminance, linear, grid, out);
    return;
  }
  prepare(out, from, grid);
  const CellMeans::Tab& ax = out.across;
  const int cells = grid.width;
  float *lr = out.row_r.data(), *lg = out.row_g.data(), *lb = out.row_b.data();
  for (int dy = 0; dy < grid.height; ++dy) {
    float* dl = out.luminance.ptr<float>(dy);
    float* dr = out.red.ptr<float>(dy);
    float* dg = out.green.ptr<float>(dy);
    float* db = out.blue.ptr<float>(dy);
    const int first = out.down.first[dy], last = out.down.first[dy + 1];
    // One source row with weight 1 (no vertical resampling) is written
    // straight out: 0 + 1 * x is x.
    const bool single = last - first == 1 && out.down.weight[first] == 1.0f;
    float *sl = single ? dl : out.acc_l.data(), *sr = single ? dr : out.acc_r.data();
    float *sg = single ? dg : out.acc_g.data(), *sb = single ? db : out.acc_b.data();
    if (!single) std::fill(dl, dl + cells, 0.0f), std::fill(dr, dr + cells, 0.0f),
                 std::fill(dg, dg + cells, 0.0f), std::fill(db, db + cells, 0.0f);
    for (int e = first; e < last; ++e) {
      const int sy = out.down.source[e];
      const uint8_t* px = bgr8.ptr<uint8_t>(sy);
      const float* pl = luminance.ptr<float>(sy);
      for (int x = 0; x < from.width; ++x, px += 3) {
        lb[x] = lin[px[0]];
        lg[x] = lin[px[1]];
        lr[x] = lin[px[2]];
      }
      // Horizontal pass: each cell's sum of weighted pixels, from 0 in
      // table order (OpenCV's buf[d] += S[s] * alpha).
      for (int d = 0; d < cells; ++d) {
        float l = 0, r = 0, g = 0, b = 0;
        for (int k = ax.first[d]; k < ax.first[d + 1]; ++k) {
          const int s = ax.source[k];
          const float w = ax.weight[k];
          l = l + pl[s] * w;
          r = r + lr[s] * w;
          g = g + lg[s] * w;
          b = b + lb[s] * w;
        }
        sl[d] = l, sr[d] = r, sg[d] = g, sb[d] = b;
      }
      if (single) continue;
      // Vertical pass: sum += beta * row, in table order.
      const float beta = out.down.weight[e];
      for (int d = 0; d < cells; ++d) {
        dl[d] += beta * sl[d];
        dr[d] += beta * sr[d];
        dg[d] += beta * sg[d];
        db[d] += beta * sb[d];
      }
    }
  }
}

}  // namespace clipwarden::flash
