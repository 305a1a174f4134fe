#include "analyzer/drift/box_mean.h"

#include <algorithm>

#include <opencv2/imgproc.hpp>

namespace framelint::drift {
namespace {

// Loops run over fixed-size chunks so that -O2 (GCC's very cheap
// vectorizer cost model, which needs trip counts that are a multiple of
// the vector width) turns them into vector code; a scalar loop ends a row.
constexpr int kChunk = 16;
constexpr int kShift = 22;

// Rounded division by `count` as a multiply and a shift: with
// m = ceil(2^22 / count) and e = m * count - 2^22, floor(t * m / 2^22) =
// floor(t / count) whenever t * e < 2^22 (the error term t * e /
// (count * 2^22) then stays below 1 / count), and t * m must fit 32 bits.
struct Divider {
  uint32_t m = 0, half = 0;
  bool exact = false;
  explicit Divider(uint32_t count) {
    m = ((1u << kShift) + count - 1) / count;
    half = (count - 1) / 2;
    const uint64_t e = static_cast<uint64_t>(m) * count - (1u << kShift);
    const uint64_t t_max = 255ull * count + half;
    exact = t_max * e < (1ull << kShift) && t_max * m < (1ull << 32);
  }
  // round(sum / count) = floor((sum + (count - 1) / 2) / count) for odd count.
  uint8_t operator()(uint32_t sum) const {
    return static_cast<uint8_t>(((sum + half) * m) >> kShift);
  }
};

}  // namespace

void box_mean(const cv::Mat& src, int radius, cv::Mat& dst, std::vector<uint16_t>& scratch) {
  const int side = 2 * radius + 1;
  const Divider divide(static_cast<uint32_t>(side * side));
  // Window sums must fit 16 bits (255 * 15^2 < 2^16).
  if (src.depth() != CV_8U || radius < 1 || radius > 7 || !divide.exact) {
    cv::blur(src, dst, cv::Size(side, side), cv::Point(-1, -1), cv::BORDER_REPLICATE);
    return;
  }
  const int rows = src.rows, cn = src.channels(), n = src.cols * cn, pad = radius * cn;
  dst.create(src.size(), src.type());
  // Column sums over the window's rows, with `radius` columns repeated at
  // each end (the left and right edge pixels).
  scratch.assign(static_cast<size_t>(n + 2 * pad), 0);
  uint16_t* col = scratch.data() + pad;
  auto row = [&](int y) { return src.ptr<uint8_t>(std::clamp(y, 0, rows - 1)); };
  for (int dy = -radius; dy <= radius; ++dy) {
    const uint8_t* s = row(dy);
    for (int i = 0; i < n; ++i) col[i] = static_cast<uint16_t>(col[i] + s[i]);
  }
  for (int y = 0; y < rows; ++y) {
    if (y > 0) {  // slide the window down a row
      const uint8_t* add = row(y + radius);
      const uint8_t* sub = row(y - 1 - radius);
      int i = 0;
      for (; i + kChunk <= n; i += kChunk) {
        uint16_t change[kChunk];  // a local copy keeps the loops free of aliasing
        for (int j = 0; j < kChunk; ++j) change[j] = static_cast<uint16_t>(add[i + j] - sub[i + j]);
        for (int j = 0; j < kChunk; ++j) col[i + j] = static_cast<uint16_t>(col[i + j] + change[j]);
      }
      for (; i < n; ++i) col[i] = static_cast<uint16_t>(col[i] + add[i] - sub[i]);
    }
    for (int k = 1; k <= radius; ++k) {
      for (int c = 0; c < cn; ++c) {
        col[-k * cn + c] = col[c];
        col[n - cn + c + k * cn] = col[n - cn + c];
      }
    }
    uint8_t* d = dst.ptr<uint8_t>(y);
    const uint16_t* window_start = col - pad;
    int i = 0;
    for (; i + kChunk <= n; i += kChunk) {
      uint16_t sum[kChunk] = {};
      for (int k = 0; k < side; ++k) {
        const uint16_t* c = window_start + i + k * cn;
        for (int j = 0; j < kChunk; ++j) sum[j] = static_cast<uint16_t>(sum[j] + c[j]);
      }
      uint32_t q[kChunk];
      for (int j = 0; j < kChunk; ++j) q[j] = ((sum[j] + divide.half) * divide.m) >> kShift;
      for (int j = 0; j < kChunk; ++j) d[i + j] = static_cast<uint8_t>(q[j]);
    }
    for (; i < n; ++i) {
      uint32_t sum = 0;
      for (int k = 0; k < side; ++k) sum += window_start[i + k * cn];
      d[i] = divide(sum);
    }
  }
}

}  // namespace framelint::drift
