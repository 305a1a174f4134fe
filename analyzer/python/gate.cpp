// clipwarden.gate (a batch, its results yielded as clips finish),
// clipwarden.compare and clipwarden.default_policy. The batch runs in the
// library's run_gate on a thread of its own; the iterator waits for results
// without the GIL and looks for Ctrl-C while it waits.
#include <condition_variable>
#include <deque>
#include <filesystem>
#include <mutex>
#include <thread>

#include <pybind11/stl.h>

#include "analyzer/cli/output_names.h"
#include "analyzer/python/binding.h"
#include "analyzer/python/stoppable_source.h"
#include "clipwarden/compare.h"
#include "clipwarden/gate.h"

namespace clipwarden::python {
namespace {

// What the batch thread and the iterator share. Owned jointly, and by the
// library's workers through the analyze function: a stopped batch's
// abandoned workers may outlive the iterator (run_gate's stop contract).
struct BatchChannel {
  std::mutex mutex;
  std::condition_variable changed;
  std::deque<ClipResult> finished;
  std::optional<Expected<GateRun>> outcome;  // set when run_gate returns
  std::atomic<bool> stop{false};
};

class GateIterator {
 public:
  GateIterator(std::vector<GateInput> inputs, GateOptions options)
      : channel_(std::make_shared<BatchChannel>()), out_dir_(options.out_dir) {
    auto channel = channel_;
    options.stop = &channel->stop;
    options.stop_grace_s = 0;  // in-flight clips end at once through their sources below
    options.analyze = [channel](const std::string& path, const AnalysisSettings& settings,
                                const Policy& policy, const AnalysisHooks& hooks) {
      return analyze_clip_until(path, settings, policy, hooks, channel->stop);
    };
    GateObserver observer;
    observer.on_clip_done = [channel](const ClipResult& result, const GateCounts&) {
      std::lock_guard lock(channel->mutex);
      channel->finished.push_back(result);
      channel->changed.notify_all();
    };
    runner_ = std::thread([channel, inputs = std::move(inputs), options = std::move(options),
                           observer = std::move(observer)] {
      OpenCvSingleThreaded single;
      auto run = run_gate(inputs, options, observer);
      std::lock_guard lock(channel->mutex);
      channel->outcome.emplace(std::move(run));
      channel->changed.notify_all();
    });
  }
  ~GateIterator() { close(); }
  GateIterator(const GateIterator&) = delete;
  GateIterator& operator=(const GateIterator&) = delete;

  ClipResult next() {
    while (true) {
      std::optional<ClipResult> result;
      bool ended = false;
      {
        py::gil_scoped_release release;
        std::unique_lock lock(channel_->mutex);
        channel_->changed.wait_for(lock, std::chrono::milliseconds(100), [&] {
          return !channel_->finished.empty() || channel_->outcome.has_value();
        });
        if (!channel_->finished.empty()) {
          result = std::move(channel_->finished.front());
          channel_->finished.pop_front();
        } else {
          ended = channel_->outcome.has_value();
        }
      }
      if (result) return std::move(*result);
      if (ended) {
        join();
        const Expected<GateRun>& run = *channel_->outcome;
        if (!run) raise_error(run.error());
        throw py::stop_iteration();
      }
      if (PyErr_CheckSignals() != 0) {
        py::error_already_set interrupt;
        close();
        throw interrupt;
      }
    }
  }

  // Stops the batch (no clip starts, clips in flight end) and waits for it.
  void close() {
    channel_->stop.store(true);
    py::gil_scoped_release release;
    join();
  }
  const std::string& out_dir() const { return out_dir_; }

 private:
  void join() {
    if (runner_.joinable()) runner_.join();
  }

  std::shared_ptr<BatchChannel> channel_;
  std::string out_dir_;
  std::thread runner_;
};

py::object optional_text(const std::string& s) {
  if (s.empty()) return py::none();
  return py::str(s);
}

std::unique_ptr<GateIterator> gate(const py::object& paths, const py::object& out,
                                   const py::object& policy, const py::object& jobs,
                                   const py::object& preset, const py::object& width,
                                   const py::object& threads, const py::object& fps,
                                   const py::object& db, bool html) {
  std::vector<std::string> args;
  if (py::isinstance<py::str>(paths) || py::hasattr(paths, "__fspath__"))
    args.push_back(path_text(paths));
  else
    for (const auto& p : paths) args.push_back(path_text(p));
  const cli::AnalysisOptions options = analysis_options(preset, width, threads, fps, policy);
  GateOptions gate;
  gate.settings = options.settings;
  gate.policy = options.policy;
  gate.out_dir = out.is_none() ? py::module_::import("tempfile")
                                     .attr("mkdtemp")(py::arg("prefix") = "clipwarden-gate-")
                                     .cast<std::string>()
                               : path_text(out);
  if (!db.is_none()) gate.db_path = path_text(db);
  if (!jobs.is_none()) {
    gate.jobs = jobs.cast<int>();
    if (gate.jobs < 1) raise_error(usage_error("jobs", "must be at least 1"));
  }
  gate.collect_thumbnails = html;  // the pages then need not decode each clip again
  gate.write_report = [html](const Report& r, const std::string& base,
                             const std::vector<Thumbnail>* thumbnails) {
    cli::ReportExtras extras;
    extras.thumbnails = thumbnails;
    return cli::write_reports(r, base, html, extras);
  };
  CollectedInputs collected = take(collect_inputs(args));
  cli::OutputNamer namer;  // report names as `clipwarden gate` gives them
  for (auto& in : collected.inputs) in.output_name = namer.unique_name(in.path);
  for (const auto& w : collected.warnings)  // e.g. a clip named twice, as the CLI warns
    if (PyErr_WarnEx(PyExc_UserWarning, w.c_str(), 1) < 0) throw py::error_already_set();
  return std::make_unique<GateIterator>(std::move(collected.inputs), std::move(gate));
}

py::object compare(const py::object& a, const py::object& b, const py::object& pair_by,
                   const std::vector<std::string>& statistics, const py::object& out) {
  CompareOptions options;
  if (!pair_by.is_none()) {
    const std::string text = py::str(pair_by);
    const auto by = pair_by_from_string(text);
    if (!by)
      raise_error(usage_error("pair_by", "expects id, prompt_id or name, got '" + text + "'"));
    options.pair_by = *by;
  }
  options.statistics = statistics;
  const std::string dir_a = path_text(a), dir_b = path_text(b);
  std::optional<Expected<Comparison>> result;
  {
    py::gil_scoped_release release;
    result.emplace(compare_report_folders(dir_a, dir_b, options));
  }
  Comparison comparison = take(std::move(*result));
  if (!out.is_none()) {
    const std::string out_dir = path_text(out);
    Status written = Ok{};
    {
      py::gil_scoped_release release;
      written = write_comparison(comparison, out_dir);
    }
    if (!written) raise_error(written.error());
  }
  return python_from_json_text(comparison_to_json(comparison).dump());
}

}  // namespace

void add_gate(py::module_& m) {
  py::class_<ClipResult>(m, "GateResult", "One clip's line of the review queue.")
      .def_property_readonly("path", [](const ClipResult& r) { return r.input.path; })
      .def_property_readonly("id", [](const ClipResult& r) { return r.input.id; })
      .def_property_readonly("prompt_id",
                             [](const ClipResult& r) { return optional_text(r.input.prompt_id); })
      .def_property_readonly("status", &queue_status, "'pass', 'review', 'reject' or 'error'.")
      .def_property_readonly("coherence",
                             [](const ClipResult& r) -> py::object {
                               if (!is_defined(r.coherence)) return py::none();
                               return py::float_(r.coherence);
                             })
      .def_property_readonly("reasons", [](const ClipResult& r) { return r.reasons; })
      .def_property_readonly(
          "report", [](const ClipResult& r) { return optional_text(r.report); },
          "The JSON report's path relative to the output folder, or None.")
      .def_property_readonly(
          "error",
          [](const ClipResult& r) -> py::object {
            if (!r.error) return py::none();
            return py::str(r.error->message());
          },
          "Why the clip could not be judged (the CLI's line), or None.")
      .def_property_readonly("from_store", [](const ClipResult& r) { return r.from_store; })
      .def(
          "to_dict", [](const ClipResult& r) { return queue_line(r); },
          "The queue.jsonl line as a dict.")
      .def("__repr__", [](const ClipResult& r) {
        return "<clipwarden.GateResult '" + r.input.path + "': " + queue_status(r) + ">";
      });

  py::class_<GateIterator>(m, "Gate", "A running batch: iterate to get results as clips finish.")
      .def("__iter__", [](GateIterator& g) -> GateIterator& { return g; })
      .def("__next__", &GateIterator::next)
      .def(
          "close", &GateIterator::close,
          "Stops the batch: no clip starts, clips in flight stop; finished ones stay in the queue.")
      .def("__enter__", [](GateIterator& g) -> GateIterator& { return g; })
      .def("__exit__", [](GateIterator& g, const py::args&) { g.close(); })
      .def_property_readonly("out", &GateIterator::out_dir,
                             "The output folder (queue.jsonl, index.html, reports, store).");

  m.def("gate", &gate, py::arg("paths"), py::kw_only(), py::arg("out") = py::none(),
        py::arg("policy") = py::none(), py::arg("jobs") = py::none(),
        py::arg("preset") = py::none(), py::arg("width") = py::none(),
        py::arg("threads") = py::none(), py::arg("fps") = py::none(), py::arg("db") = py::none(),
        py::arg("html") = true,
        R"(Judges a batch as `clipwarden gate` does and yields a GateResult per clip as it finishes.

paths: clips, folders (searched recursively) and .jsonl manifests. out: the
output folder (default: a new temporary folder, see Gate.out). Clips already
in the results store (db, default out/clipwarden.db) are not recomputed.
Ctrl-C or close() stops the batch; rerunning finishes it.)");
  m.def("compare", &compare, py::arg("reports_a"), py::arg("reports_b"), py::kw_only(),
        py::arg("pair_by") = py::none(), py::arg("statistics") = std::vector<std::string>{"p95"},
        py::arg("out") = py::none(),
        R"(Compares two folders of reports (or gate outputs) as `clipwarden compare` does.

pair_by: 'id', 'prompt_id' or 'name' (default: prompt_id when both sides are
gate outputs that carry it, else name). statistics: per-metric summary
statistics compared (mean, p50, p95, max). Returns the comparison as a dict
(compare.json); with out, also writes
out/compare.json and out/compare.html.)");
  m.def(
      "default_policy",
      [] { return python_from_json_text(policy_to_json(default_policy()).dump()); },
      "The built-in policy as a dict in the policy file's format (edit it and pass it as "
      "policy=).");
}

}  // namespace clipwarden::python
