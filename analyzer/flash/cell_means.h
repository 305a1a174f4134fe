// The flash grid's cell means of one frame: relative luminance and the
// linear-light R, G, B, each the area average of the pixels a cell covers.
//
// They are exactly what cv::resize(..., INTER_AREA) gives for the luminance
// plane and for the linear-light colour image (the sRGB table applied to
// every pixel): the same source/weight tables (OpenCV's area-resampling
// tables, rebuilt here) and the same float operations in the same order,
// so the numbers are bit-identical. Done in one pass over the 8-bit frame,
// the table lookups fused into the horizontal pass, it costs a fraction of
// the table pass plus two resizes, and needs no full-size float image.
// (tests/unit/flash_cell_means_test.cpp checks it against cv::resize.)
#pragma once

#include <vector>

#include <opencv2/core.hpp>

namespace clipwarden::flash {

struct CellMeans {
  // CV_32FC1, grid size: relative luminance and linear-light R, G, B.
  cv::Mat luminance, red, green, blue;

  // Which frame they belong to (set by the caller; -1 when unset).
  int64_t frame_index = -1;
  double t_s = 0;

  // Scratch: area tables for the last sizes seen, one row of linear colour.
  struct Tab {
    std::vector<int> first;     // entries of cell d: [first[d], first[d + 1])
    std::vector<int> source;    // source pixel (column or row)
    std::vector<float> weight;  // its weight
  };
  cv::Size tab_from, tab_to;
  Tab across, down;
  std::vector<float> row_r, row_g, row_b, acc_l, acc_r, acc_g, acc_b;
};

// The grid of about 0.1 degree cells for a frame: at most cells_per_axis
// each way, never more cells than pixels.
cv::Size flash_grid(cv::Size frame, int cells_per_axis);

// Cell means of a frame from its relative luminance (CV_32FC1) and its 8-bit
// BGR pixels (CV_8UC3, linearised by srgb8_to_linear_table()).
void compute_cell_means(const cv::Mat& luminance, const cv::Mat& bgr8, cv::Size grid,
                        CellMeans& out);

// The same from a linear-light colour image (CV_32FC3, B, G, R), by
// cv::resize: the reference form, used when the caller already has it.
void cell_means_of_linear(const cv::Mat& luminance, const cv::Mat& linear_bgr, cv::Size grid,
                          CellMeans& out);

}  // namespace clipwarden::flash
