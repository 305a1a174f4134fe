#include "analyzer/python/frame_iterator.h"

#include <cstring>

#include <pybind11/numpy.h>

namespace clipwarden::python {
namespace {

std::string shape_text(const py::array& a) {
  std::string text = "(";
  for (py::ssize_t i = 0; i < a.ndim(); ++i) text += (i ? ", " : "") + std::to_string(a.shape(i));
  return text + (a.ndim() == 1 ? ",)" : ")");
}

// The OpenCV element type for a NumPy dtype, or -1.
int mat_type(const py::array& a) {
  if (py::isinstance<py::array_t<uint8_t>>(a)) return CV_8UC3;
  if (py::isinstance<py::array_t<float>>(a)) return CV_32FC3;
  if (py::isinstance<py::array_t<double>>(a)) return CV_64FC3;
  return -1;
}

std::string dtype_problem(const py::array& a) {
  return "dtype " + py::str(a.dtype()).cast<std::string>() +
         " is not supported: use uint8 (0-255) or float32/float64 (0-1)";
}

}  // namespace

struct FrameIterator::State {
  std::string name;
  py::object iterator;  // touched only with the GIL held
  std::unique_ptr<py::error_already_set> raised;
  int64_t index = 0;

  // One frame as a Mat of its own (CV_8UC3 or floating point, RGB).
  Expected<FrameRead> next(cv::Mat& rgb) {
    py::gil_scoped_acquire gil;
    try {
      PyObject* item = PyIter_Next(iterator.ptr());
      if (!item) {
        if (PyErr_Occurred()) throw py::error_already_set();
        return FrameRead::end_of_clip;
      }
      const py::object frame = py::reinterpret_steal<py::object>(item);
      const std::string subject = name + ": frame " + std::to_string(index++);
      const py::array array = py::array::ensure(frame);
      if (!array) return usage_error(subject, "is not an array");
      if (array.ndim() != 3 || array.shape(2) != 3)
        return usage_error(subject,
                           "must be an H x W x 3 (RGB) array, got shape " + shape_text(array));
      const int type = mat_type(array);
      if (type < 0) return usage_error(subject, dtype_problem(array));
      const py::array packed = py::array::ensure(array, py::array::c_style);
      rgb.create(static_cast<int>(array.shape(0)), static_cast<int>(array.shape(1)), type);
      std::memcpy(rgb.data, packed.data(), static_cast<size_t>(packed.nbytes()));
      return FrameRead::frame;
    } catch (py::error_already_set& e) {
      raised = std::make_unique<py::error_already_set>(std::move(e));
      return Error{ErrorKind::internal, name, "the frame iterable raised an exception"};
    }
  }
};

FrameIterator::FrameIterator(const py::object& frames, const std::string& name)
    : state_(std::make_shared<State>()) {
  state_->name = name;
  if (py::isinstance<py::array>(frames)) {
    const py::array array = py::reinterpret_borrow<py::array>(frames);
    if (array.ndim() != 4 || array.shape(3) != 3)
      raise_error(usage_error(
          name, "a frame array must be T x H x W x 3 (RGB), got shape " + shape_text(array)));
    if (mat_type(array) < 0) raise_error(usage_error(name, dtype_problem(array)));
    known_count_ = array.shape(0);
  }
  state_->iterator = py::iter(frames);
}

FrameFeed FrameIterator::feed() const {
  return [state = state_](cv::Mat& rgb) { return state->next(rgb); };
}

void FrameIterator::rethrow() const {
  if (state_->raised) throw *state_->raised;
}

}  // namespace clipwarden::python
