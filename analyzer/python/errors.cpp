// Library errors as Python exceptions. Every one derives from
// clipwarden.Error and carries kind, subject and cause; usage errors are
// also ValueError, unreadable inputs and unwritable outputs also OSError,
// so code that already catches those keeps working.
#include "analyzer/python/binding.h"

namespace clipwarden::python {
namespace {

struct ErrorTypes {
  PyObject* base = nullptr;
  PyObject* usage = nullptr;
  PyObject* input = nullptr;
  PyObject* output = nullptr;
};
ErrorTypes g_types;  // created once at import, alive as long as the interpreter

PyObject* new_type(const char* name, const char* doc, PyObject* bases) {
  PyObject* type = PyErr_NewExceptionWithDoc(name, doc, bases, nullptr);
  if (!type) throw py::error_already_set();
  return type;
}

const char* kind_name(ErrorKind kind) {
  switch (kind) {
    case ErrorKind::usage:
      return "usage";
    case ErrorKind::input:
      return "input";
    case ErrorKind::output:
      return "output";
    case ErrorKind::internal:
      return "internal";
  }
  return "internal";
}

}  // namespace

void add_errors(py::module_& m) {
  g_types.base = new_type("clipwarden.Error",
                          "A clipwarden call failed. str(e) is the line the CLI prints; "
                          "e.kind, e.subject and e.cause give its parts.",
                          PyExc_Exception);
  const py::tuple usage_bases =
      py::make_tuple(py::handle(g_types.base), py::handle(PyExc_ValueError));
  g_types.usage =
      new_type("clipwarden.UsageError", "A bad argument, setting, policy, manifest or frame array.",
               usage_bases.ptr());
  const py::tuple os_bases = py::make_tuple(py::handle(g_types.base), py::handle(PyExc_OSError));
  g_types.input =
      new_type("clipwarden.InputError", "An input could not be read or decoded.", os_bases.ptr());
  g_types.output =
      new_type("clipwarden.OutputError", "A result could not be written.", os_bases.ptr());
  m.attr("Error") = py::handle(g_types.base);
  m.attr("UsageError") = py::handle(g_types.usage);
  m.attr("InputError") = py::handle(g_types.input);
  m.attr("OutputError") = py::handle(g_types.output);
}

void raise_error(const Error& error) {
  PyObject* type = error.kind == ErrorKind::usage    ? g_types.usage
                   : error.kind == ErrorKind::input  ? g_types.input
                   : error.kind == ErrorKind::output ? g_types.output
                                                     : g_types.base;
  py::object exception = py::reinterpret_borrow<py::object>(type)(error.message());
  exception.attr("kind") = kind_name(error.kind);
  exception.attr("subject") = error.subject;
  exception.attr("cause") = error.cause;
  PyErr_SetObject(type, exception.ptr());
  throw py::error_already_set();
}

std::string path_text(const py::handle& path) {
  const py::module_ os = py::module_::import("os");
  return os.attr("fsdecode")(os.attr("fspath")(path)).cast<std::string>();
}

py::object python_from_json_text(const std::string& text) {
  return py::module_::import("json").attr("loads")(text);
}

}  // namespace clipwarden::python
