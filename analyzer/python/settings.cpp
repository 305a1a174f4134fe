// Analysis settings from keyword arguments, and OpenCV's thread count
// while analyses run.
#include <mutex>

#include <opencv2/core.hpp>

#include "analyzer/python/binding.h"

namespace clipwarden::python {

cli::AnalysisOptions analysis_options(const py::object& preset, const py::object& width,
                                      const py::object& threads, const py::object& fps,
                                      const py::object& policy) {
  std::vector<std::string> args;
  auto add = [&](const char* name, const py::object& value) {
    if (value.is_none()) return;
    if (py::isinstance<py::bool_>(value))
      throw py::type_error(std::string(name) + " must not be a bool");
    args.push_back(std::string("--") + name + "=" + py::str(value).cast<std::string>());
  };
  add("preset", preset);
  add("width", width);
  add("threads", threads);
  add("fps", fps);
  const bool policy_dict = py::isinstance<py::dict>(policy);
  if (!policy.is_none() && !policy_dict) args.push_back("--policy=" + path_text(policy));
  auto parsed = take(cli::parse_args(args, cli::analysis_option_specs()));
  cli::AnalysisOptions options = take(cli::analysis_options_from_args(parsed));
  if (policy_dict) {
    const nlohmann::json given = policy;
    options.policy = take(parse_policy(given.dump(), "policy"));
  }
  return options;
}

namespace {
std::mutex g_opencv_mutex;
int g_opencv_users = 0;
int g_opencv_threads = 0;
}  // namespace

OpenCvSingleThreaded::OpenCvSingleThreaded() {
  std::lock_guard lock(g_opencv_mutex);
  if (g_opencv_users++ == 0) {
    g_opencv_threads = cv::getNumThreads();
    cv::setNumThreads(1);
  }
}

OpenCvSingleThreaded::~OpenCvSingleThreaded() {
  std::lock_guard lock(g_opencv_mutex);
  if (--g_opencv_users == 0) cv::setNumThreads(g_opencv_threads);
}

}  // namespace clipwarden::python
