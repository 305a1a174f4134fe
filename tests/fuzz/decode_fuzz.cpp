// Fuzz target: the clip reader fed from memory. Any container libavformat
// recognises by content goes through the same reader the CLI uses (demuxer,
// decoder, timing, scaling), over an in-memory AVIOContext. Every Error is
// an acceptable answer to bad bytes; a crash, a sanitizer report or a frame
// that breaks the DecodedFrame contract is a bug.
#include <cstdint>
#include <cstdio>
#include <cstdlib>

#include <opencv2/core.hpp>

#include "analyzer/decode/memory_source.h"

namespace {

// Bounds that keep one run short: a handful of frames, and no clip whose
// declared frames are larger than a small video's.
constexpr int kMaxFrames = 8;
constexpr int64_t kMaxDeclaredPixels = int64_t{1920} * 1080;
constexpr int kWorkingLongSide = 64;

[[noreturn]] void contract_broken(const char* what) {
  std::fprintf(stderr, "decode_fuzz: %s\n", what);
  std::abort();
}

}  // namespace

extern "C" int LLVMFuzzerInitialize(int*, char***) {
  cv::setNumThreads(0);  // one thread: runs are reproducible and cheap
  return 0;
}

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  clipwarden::SourceOptions options;
  options.working_long_side = kWorkingLongSide;
  options.threads = 1;
  auto source = clipwarden::decode::open_memory_source(data, size, "fuzz-input", options);
  if (!source) return 0;
  const clipwarden::ClipInfo& info = (*source)->info();
  if (info.width <= 0 || info.height <= 0) contract_broken("opened a clip without a frame size");
  if (int64_t{info.width} * info.height > kMaxDeclaredPixels) return 0;

  clipwarden::DecodedFrame frame;
  for (int i = 0; i < kMaxFrames; ++i) {
    auto more = (*source)->read(frame);
    if (!more || *more == clipwarden::FrameRead::end_of_clip) break;
    if (frame.index != i) contract_broken("frame index is not the decode order");
    if (frame.bgr.type() != CV_8UC3 || frame.bgr.empty())
      contract_broken("frame is not a non-empty 8-bit BGR image");
    if (std::max(frame.bgr.cols, frame.bgr.rows) > kWorkingLongSide)
      contract_broken("frame is larger than the working size");
  }
  (void)(*source)->stream_facts();
  return 0;
}
