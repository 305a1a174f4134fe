// Reading a whole clip through ClipSource in tests.
#pragma once

#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "clipwarden/clip_source.h"

namespace clipwarden::test {

struct ReadClip {
  std::optional<Error> error;   // from open() or from a read()
  std::vector<double> times_s;  // t_s of every frame handed out
  ClipInfo info;                // info() after the last read
  StreamFacts facts;            // stream_facts() after the last read
};

// Opens `path` and reads every frame; `on_frame` sees each one.
ReadClip read_clip(const std::string& path, const SourceOptions& options = {},
                   const std::function<void(const DecodedFrame&)>& on_frame = {});

}  // namespace clipwarden::test
