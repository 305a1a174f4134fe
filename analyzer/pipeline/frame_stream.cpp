#include "analyzer/pipeline/frame_stream.h"

#include <chrono>

#include "analyzer/flow/pair_builder.h"

namespace framelint {

FrameStream::FrameStream(ClipSource& source, size_t capacity)
    : source_(source), queue_(capacity), thread_([this] { run(); }) {}

FrameStream::~FrameStream() {
  queue_.close();
  if (thread_.joinable()) thread_.join();
}

void FrameStream::run() {
  DecodedFrame frame;
  using Clock = std::chrono::steady_clock;
  while (true) {
    const auto start = Clock::now();
    auto more = source_.read(frame);
    if (!more) {
      error_ = more.error();
      break;
    }
    if (!*more) break;
    auto planes = std::make_shared<FramePlanes>();
    prepare_planes(frame.index, frame.t_s, frame.bgr, *planes);
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

}  // namespace framelint
