#include "analyzer/pipeline/held_frame.h"

#include <algorithm>
#include <cstdint>
#include <cstring>

namespace clipwarden {

bool sparse_difference(const cv::Mat& plane, const cv::Mat& base, PlaneDifference& out) {
  out = PlaneDifference{};
  if (plane.empty() && base.empty()) return true;
  if (plane.size() != base.size() || plane.type() != base.type()) return false;
  const size_t row_bytes = plane.cols * plane.elemSize();
  const size_t total = row_bytes * static_cast<size_t>(plane.rows);
  if (total > UINT32_MAX) return false;
  // Each differing byte costs 5 (offset and value): beyond a twentieth of
  // the plane the difference would be over a quarter of its size.
  const size_t max_differing = total / 20;
  constexpr size_t kBlock = 64;  // compare blocks first: a repeat is mostly equal
  for (int y = 0; y < plane.rows; ++y) {
    const uint8_t* p = plane.ptr<uint8_t>(y);
    const uint8_t* b = base.ptr<uint8_t>(y);
    for (size_t x0 = 0; x0 < row_bytes; x0 += kBlock) {
      const size_t n = std::min(kBlock, row_bytes - x0);
      if (std::memcmp(p + x0, b + x0, n) == 0) continue;
      for (size_t x = x0; x < x0 + n; ++x)
        if (p[x] != b[x]) {
          if (out.values.size() == max_differing) return false;
          out.offsets.push_back(static_cast<uint32_t>(static_cast<size_t>(y) * row_bytes + x));
          out.values.push_back(p[x]);
        }
    }
  }
  return true;
}

void apply_difference(const cv::Mat& base, const PlaneDifference& difference, cv::Mat& out) {
  if (base.empty()) {
    out.release();
    return;
  }
  base.copyTo(out);
  const size_t row_bytes = out.cols * out.elemSize();
  for (size_t i = 0; i < difference.offsets.size(); ++i) {
    const size_t at = difference.offsets[i];
    out.ptr<uint8_t>(static_cast<int>(at / row_bytes))[at % row_bytes] = difference.values[i];
  }
}

HeldFrame::HeldFrame(Frame full) : full_(std::move(full)), index_(full_->index), t_s_(full_->t_s) {}

HeldFrame HeldFrame::repeat_of(Frame repeat, std::shared_ptr<const FramePlanes> base) {
  HeldFrame held;
  if (!base || !sparse_difference(repeat->bgr, base->bgr, held.bgr_) ||
      !sparse_difference(repeat->gray, base->gray, held.gray_))
    return HeldFrame(std::move(repeat));
  held.base_ = std::move(base);
  held.index_ = repeat->index;
  held.t_s_ = repeat->t_s;
  return held;
}

void HeldFrame::renumber(int64_t index) {
  index_ = index;
  if (full_) full_->index = index;
}

size_t HeldFrame::held_bytes() const {
  if (!full_) return bgr_.bytes() + gray_.bytes();
  return full_->bgr.total() * full_->bgr.elemSize() + full_->gray.total() * full_->gray.elemSize() +
         full_->luminance.total() * full_->luminance.elemSize();
}

HeldFrame::Frame HeldFrame::take(const std::function<Frame()>& spare) {
  if (full_) return std::move(full_);
  Frame planes = spare();
  apply_difference(base_->bgr, bgr_, planes->bgr);
  apply_difference(base_->gray, gray_, planes->gray);
  planes->index = index_;
  planes->t_s = t_s_;
  base_.reset();
  return planes;
}

}  // namespace clipwarden
