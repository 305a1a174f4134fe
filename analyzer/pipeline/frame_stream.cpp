#include "analyzer/pipeline/frame_stream.h"

#include <chrono>

#include "analyzer/flow/pair_builder.h"

namespace clipwarden {

FrameStream::FrameStream(ClipSource& source, size_t capacity)
    : source_(source), queue_(capacity), pool_(PlanesPool::create()), thread_([this] { run(); }) {}

FrameStream::~FrameStream() {
  queue_.close();
  if (thread_.joinable()) thread_.join();
}

void FrameStream::run() {
  DecodedFrame frame;
  using Clock = std::chrono::steady_clock;
  std::vector<HeldFrame> ready;
  auto spare = [this] { return pool_->take(); };
  // Luminance only for the frames analysed: a repeat the cadence leaves
  // out never needs it, and a frame held back by the filter waits without.
  // A repeat held as a difference is rebuilt here, one at a time.
  auto hand_on = [&] {
    for (auto& held : ready) {
      const auto start = Clock::now();
      std::shared_ptr<FramePlanes> planes = held.take(spare);
      prepare_luminance(*planes);
      busy_ms_ += std::chrono::duration<double, std::milli>(Clock::now() - start).count();
      if (!queue_.push(std::move(planes))) return false;  // consumer stopped
    }
    ready.clear();
    return true;
  };
  while (true) {
    const auto start = Clock::now();
    // The decoder scales straight into a recycled frame's BGR buffer.
    std::shared_ptr<FramePlanes> planes = pool_->take();
    std::swap(frame.bgr, planes->bgr);
    auto more = source_.read(frame);
    std::swap(frame.bgr, planes->bgr);
    if (!more) {
      error_ = more.error();
      break;
    }
    if (*more == FrameRead::end_of_clip) break;
    prepare_gray(frame.index, frame.t_s, planes->bgr, *planes);
    cadence_.push(std::move(planes), ready);
    busy_ms_ += std::chrono::duration<double, std::milli>(Clock::now() - start).count();
    if (!hand_on()) return;
  }
  // A stream that stopped on an error is not analysed: nothing to hand on.
  if (!error_) {
    cadence_.finish(ready);
    if (!hand_on()) return;
  }
  queue_.close();
}

std::shared_ptr<const FramePlanes> FrameStream::next() {
  auto item = queue_.pop();
  if (!item) {
    if (thread_.joinable()) thread_.join();  // error_ is final after the join
    return nullptr;
  }
  return std::move(*item);
}

}  // namespace clipwarden
