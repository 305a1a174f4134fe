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
    if (!*more) break;
    prepare_planes(frame.index, frame.t_s, planes->bgr, *planes);
    busy_ms_ += std::chrono::duration<double, std::milli>(Clock::now() - start).count();
    if (!queue_.push(std::move(planes))) return;  // consumer stopped
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
