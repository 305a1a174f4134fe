// How a stop request (Ctrl-C, Gate.close) reaches a running analysis: the
// clip's source is wrapped so that its next read ends the clip with an
// error once the flag is set; the pipeline then winds down as after a
// corrupt frame (decoder thread and workers joined, nothing left running).
#pragma once

#include <algorithm>
#include <atomic>
#include <string>
#include <thread>

#include "clipwarden/analysis.h"
#include "clipwarden/clip_source.h"

namespace clipwarden::python {

class StoppableSource final : public ClipSource {
 public:
  StoppableSource(ClipSource& inner, const std::atomic<bool>& stop, std::string path)
      : inner_(inner), stop_(stop), path_(std::move(path)) {}
  const ClipInfo& info() const override { return inner_.info(); }
  StreamFacts stream_facts() const override { return inner_.stream_facts(); }
  std::vector<std::string> notes() const override { return inner_.notes(); }
  Expected<FrameRead> read(DecodedFrame& frame) override {
    if (stop_.load()) return Error{ErrorKind::internal, path_, "analysis interrupted"};
    return inner_.read(frame);
  }

 private:
  ClipSource& inner_;
  const std::atomic<bool>& stop_;
  std::string path_;
};

// The source options analyze_clip opens a clip with, so a clip opened here
// is read exactly as the CLI reads it.
inline SourceOptions source_options_for(const AnalysisSettings& settings) {
  const int cores = static_cast<int>(std::max(1u, std::thread::hardware_concurrency()));
  SourceOptions options;
  options.working_long_side = settings.working_long_side;
  options.folder_fps = settings.folder_fps;
  options.threads = std::min(2, settings.threads > 0 ? settings.threads : cores);
  return options;
}

// analyze_clip, ending early once `stop` is set.
inline Expected<Report> analyze_clip_until(const std::string& path,
                                           const AnalysisSettings& settings, const Policy& policy,
                                           const AnalysisHooks& hooks,
                                           const std::atomic<bool>& stop) {
  auto source = ClipSource::open(path, source_options_for(settings));
  if (!source) return source.error();
  StoppableSource stoppable(**source, stop, path);
  return analyze_source(stoppable, path, settings, policy, hooks);
}

}  // namespace clipwarden::python
