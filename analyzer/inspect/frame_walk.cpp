#include "analyzer/inspect/frame_walk.h"

#include <utility>

#include "analyzer/flow/pair_builder.h"

namespace clipwarden {

SourceOptions source_options(const AnalysisSettings& settings) {
  SourceOptions options;
  options.working_long_side = settings.working_long_side;
  options.folder_fps = settings.folder_fps;
  options.threads = settings.threads;
  return options;
}

Expected<FrameWalkResult> walk_frames(const std::string& clip_path,
                                      const AnalysisSettings& settings, const FrameWalk& walk) {
  auto source = ClipSource::open(clip_path, source_options(settings));
  if (!source) return source.error();
  const int64_t last_wanted = walk.pair_frames.empty() ? -1 : *walk.pair_frames.rbegin();

  FrameWalkResult result;
  std::unique_ptr<PairBuilder> builder;  // made on first use: DIS setup is not free
  DecodedFrame previous, current;        // swapped each step; the decoder may reuse buffers
  bool have_previous = false;
  FramePlanes prev_planes, cur_planes;
  FramePair pair;
  for (;;) {
    if (!walk.decode_to_end && result.frames_decoded > last_wanted) break;
    auto more = (*source)->read(current);
    if (!more) return more.error();
    if (*more == FrameRead::end_of_clip) {
      result.reached_end = true;
      break;
    }
    ++result.frames_decoded;
    if (walk.on_frame) walk.on_frame(current);
    if (walk.pair_frames.count(current.index)) {
      if (!have_previous) {
        if (walk.on_first_frame) {
          prepare_planes(current.index, current.t_s, current.bgr, cur_planes);
          walk.on_first_frame(cur_planes);
        }
      } else if (walk.on_pair) {
        prepare_planes(previous.index, previous.t_s, previous.bgr, prev_planes);
        prepare_planes(current.index, current.t_s, current.bgr, cur_planes);
        if (!builder) builder = std::make_unique<PairBuilder>(settings.preset);
        builder->build(prev_planes, cur_planes, pair);
        walk.on_pair(pair);
      }
    }
    std::swap(previous, current);
    have_previous = true;
  }
  return result;
}

}  // namespace clipwarden
