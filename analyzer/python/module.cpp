// The Python module clipwarden._core (re-exported by clipwarden/__init__.py).
#include "analyzer/python/binding.h"
#include "clipwarden/version.h"

PYBIND11_MODULE(_core, m) {
  namespace python = clipwarden::python;
  m.doc() = "clipwarden: temporal coherence checks of video clips (compiled part)";
  m.attr("__version__") = clipwarden::version();
  python::add_errors(m);
  python::add_report(m);
  python::add_analyze(m);
  python::add_gate(m);
}
