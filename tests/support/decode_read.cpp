#include "support/decode_read.h"

namespace clipwarden::test {

ReadClip read_clip(const std::string& path, const SourceOptions& options,
                   const std::function<void(const DecodedFrame&)>& on_frame) {
  ReadClip result;
  auto source = ClipSource::open(path, options);
  if (!source) {
    result.error = source.error();
    return result;
  }
  DecodedFrame frame;
  for (;;) {
    auto more = (*source)->read(frame);
    if (!more) {
      result.error = more.error();
      break;
    }
    if (*more == FrameRead::end_of_clip) break;
    result.times_s.push_back(frame.t_s);
    if (on_frame) on_frame(frame);
  }
  result.info = (*source)->info();
  result.facts = (*source)->stream_facts();
  return result;
}

}  // namespace clipwarden::test
