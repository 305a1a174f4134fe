// What the binding's files share: pybind11, the JSON caster, errors raised
// as Python exceptions, and the analysis settings taken from keyword
// arguments. The binding only translates: every computation is the
// library's (include/clipwarden/).
#pragma once

#include <memory>
#include <string>

#include <pybind11/pybind11.h>
#include <pybind11_json/pybind11_json.hpp>

#include "analyzer/cli/settings_args.h"
#include "clipwarden/error.h"

namespace clipwarden::python {

namespace py = pybind11;

// clipwarden.Error and its subclasses (errors.cpp).
void add_errors(py::module_& m);
// Raises the library's error as the matching Python exception; its text is
// the CLI's line, Error::message().
[[noreturn]] void raise_error(const Error& error);
template <class T>
T take(Expected<T> result) {
  if (!result) raise_error(result.error());
  return std::move(result.value());
}

// os.fsdecode(os.fspath(path)): str, bytes and path-like objects.
std::string path_text(const py::handle& path);
// Parses JSON text into Python objects with json.loads (keeps key order).
py::object python_from_json_text(const std::string& text);

// The settings keywords shared by analyze, analyze_frames and gate, checked
// by the CLI's own option parser so the errors read the same. `policy` is a
// file path or a dict in the policy file's format.
cli::AnalysisOptions analysis_options(const py::object& preset, const py::object& width,
                                      const py::object& threads, const py::object& fps,
                                      const py::object& policy);

// OpenCV single-threaded while analyses run (the library parallelises over
// frame pairs itself; OpenCV's own pool nested inside would oversubscribe
// the cores, see clipwarden/analysis.h). The process-wide setting is put
// back when the last analysis ends, so cv2 in the same process keeps its
// own threads otherwise.
class OpenCvSingleThreaded {
 public:
  OpenCvSingleThreaded();
  ~OpenCvSingleThreaded();
  OpenCvSingleThreaded(const OpenCvSingleThreaded&) = delete;
  OpenCvSingleThreaded& operator=(const OpenCvSingleThreaded&) = delete;
};

// Binds each part of the API (report.cpp, analyze.cpp, gate.cpp).
void add_report(py::module_& m);
void add_analyze(py::module_& m);
void add_gate(py::module_& m);

}  // namespace clipwarden::python
