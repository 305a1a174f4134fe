// clipwarden.analyze and clipwarden.analyze_frames. The analysis runs with
// the GIL released, so other Python threads run meanwhile; between frames
// the calling thread looks for Ctrl-C (Python only runs signal handlers on
// the main thread, and only when asked while C++ code runs) and stops the
// analysis through its source (stoppable_source.h).
#include <chrono>

#include "analyzer/python/binding.h"
#include "analyzer/python/frame_iterator.h"
#include "analyzer/python/report_object.h"
#include "analyzer/python/stoppable_source.h"
#include "clipwarden/analysis.h"
#include "clipwarden/frame_feed.h"

namespace clipwarden::python {
namespace {

class InterruptWatch {
 public:
  // Called between frames on the analysing thread, without the GIL.
  void poll() {
    const auto now = std::chrono::steady_clock::now();
    if (now - last_poll_ < std::chrono::milliseconds(50)) return;
    last_poll_ = now;
    py::gil_scoped_acquire gil;
    if (PyErr_CheckSignals() != 0) {
      pending_ = std::make_unique<py::error_already_set>();  // e.g. KeyboardInterrupt
      stop_.store(true);
    }
  }
  const std::atomic<bool>& flag() const { return stop_; }
  void rethrow() const {
    if (pending_) throw *pending_;
  }

 private:
  std::atomic<bool> stop_{false};
  std::unique_ptr<py::error_already_set> pending_;
  std::chrono::steady_clock::time_point last_poll_{};
};

// Analyses `source` and wraps the result; `feed` (frames from Python) may
// hold an exception its iterator raised, which outranks the library's error.
ReportObject run_analysis(ClipSource& source, const std::string& path,
                          const cli::AnalysisOptions& options, const FrameIterator* feed) {
  InterruptWatch watch;
  auto thumbnails = std::make_shared<ThumbnailCollector>();  // for the page, as the CLI keeps
  AnalysisHooks hooks;
  hooks.on_progress = [&watch](int64_t, int64_t) { watch.poll(); };
  hooks.on_frame = [&thumbnails](const DecodedFrame& frame) { thumbnails->add(frame); };
  StoppableSource stoppable(source, watch.flag(), path);
  std::optional<Expected<Report>> result;
  {
    py::gil_scoped_release release;
    OpenCvSingleThreaded single;
    result.emplace(analyze_source(stoppable, path, options.settings, options.policy, hooks));
  }
  watch.rethrow();
  if (feed) feed->rethrow();
  return ReportObject(take(std::move(*result)), options.settings, std::move(thumbnails));
}

ReportObject analyze(const py::object& path, const py::object& preset, const py::object& width,
                     const py::object& threads, const py::object& fps, const py::object& policy) {
  const std::string clip = path_text(path);
  const cli::AnalysisOptions options = analysis_options(preset, width, threads, fps, policy);
  auto source = take(ClipSource::open(clip, source_options_for(options.settings)));
  return run_analysis(*source, clip, options, nullptr);
}

ReportObject analyze_frames(const py::object& frames, double fps, const py::object& preset,
                            const py::object& width, const py::object& threads,
                            const py::object& policy, const std::string& name) {
  const cli::AnalysisOptions options = analysis_options(preset, width, threads, py::none(), policy);
  FrameIterator iterator(frames, name);
  FrameFeedInfo info;
  info.name = name;
  info.fps = fps;
  info.frame_count = iterator.known_count();
  SourceOptions source_options;
  source_options.working_long_side = options.settings.working_long_side;
  auto source = open_frame_feed(iterator.feed(), info, source_options);
  iterator.rethrow();
  if (!source) raise_error(source.error());
  return run_analysis(**source, name, options, &iterator);
}

}  // namespace

void add_analyze(py::module_& m) {
  m.def("analyze", &analyze, py::arg("path"), py::kw_only(), py::arg("preset") = py::none(),
        py::arg("width") = py::none(), py::arg("threads") = py::none(), py::arg("fps") = py::none(),
        py::arg("policy") = py::none(),
        R"(Analyzes one clip (a video file or a folder of numbered PNG/JPEG frames).

Same analysis and settings as `clipwarden analyze`: preset ('fast', 'balanced',
'thorough'), width (long side of the analysis frames, px), threads, fps (for
frame folders), policy (a policy file path or a dict like default_policy()).
Returns a Report. The GIL is released while it runs; Ctrl-C stops it with
KeyboardInterrupt. Raises clipwarden.InputError / UsageError with the CLI's
message.)");
  m.def("analyze_frames", &analyze_frames, py::arg("frames"), py::arg("fps"), py::kw_only(),
        py::arg("preset") = py::none(), py::arg("width") = py::none(),
        py::arg("threads") = py::none(), py::arg("policy") = py::none(), py::arg("name") = "frames",
        R"(Analyzes frames already in memory, e.g. straight from a sampler.

frames: a NumPy array T x H x W x 3 (RGB; uint8 0-255, or float32/float64 in
[0, 1]) or any iterable of H x W x 3 frames, consumed one at a time (a
generator is never held in memory as a whole). fps: the frames' rate. name:
what the report calls the clip. Other settings as for analyze(). The
iterable is advanced on the analysis' decoder thread, holding the GIL for
each step.)");
}

}  // namespace clipwarden::python
