// clipwarden.Report and clipwarden.read_report.
#include <filesystem>

#include <pybind11/numpy.h>
#include <pybind11/stl.h>

#include "analyzer/cli/output_names.h"
#include "analyzer/python/binding.h"
#include "analyzer/python/report_object.h"
#include "clipwarden/report_io.h"

namespace clipwarden::python {

ReportObject::ReportObject(Report report, AnalysisSettings settings,
                           std::shared_ptr<const ThumbnailCollector> thumbnails)
    : report_(std::move(report)),
      json_(report_to_json(report_)),
      settings_(settings),
      thumbnails_(std::move(thumbnails)) {}

namespace {

py::array_t<double> to_array(const std::vector<double>& values) {
  py::array_t<double> out(static_cast<py::ssize_t>(values.size()));
  std::copy(values.begin(), values.end(), out.mutable_data());
  return out;
}

py::array_t<double> metric_values(const ReportObject& r, const std::string& name) {
  const MetricSeries* series = r.report().find_series(name);
  if (!series) throw py::key_error("no per-frame metric named '" + name + "'");
  return to_array(series->values);
}

// The text write_json_report writes (tests/python checks it against the
// CLI's file byte for byte).
std::string json_text(const ReportObject& r) { return r.json().dump(1) + "\n"; }

py::dict save(const ReportObject& r, const py::object& folder, bool html) {
  const std::string dir = path_text(folder);
  cli::ReportExtras extras;
  extras.settings = &r.settings();
  extras.thumbnails = r.thumbnails();
  const std::string base =
      (std::filesystem::path(dir) / cli::safe_stem(r.report().clip.path)).string();
  Status written = Ok{};
  {
    py::gil_scoped_release release;  // the page decodes the clip again for its pictures
    std::error_code ec;
    std::filesystem::create_directories(dir, ec);
    written = ec ? Status(output_error(dir, "cannot create output folder: " + ec.message()))
                 : cli::write_reports(r.report(), base, html, extras);
  }
  if (!written) raise_error(written.error());
  py::dict paths;
  paths["json"] = base + ".json";
  if (html) paths["html"] = base + ".html";
  return paths;
}

}  // namespace

void add_report(py::module_& m) {
  py::class_<ReportObject>(m, "Report",
                           "The report of one clip: verdict, segments, summary and every "
                           "per-frame metric, as `clipwarden analyze` writes it.")
      .def_property_readonly(
          "verdict", [](const ReportObject& r) { return to_string(r.report().verdict.status); },
          "'pass', 'review' or 'reject'.")
      .def_property_readonly(
          "reasons", [](const ReportObject& r) { return r.report().verdict.reasons; },
          "Why the verdict: each names the metric, value, threshold and time range.")
      .def_property_readonly(
          "coherence", [](const ReportObject& r) { return r.report().summary.coherence; },
          "The coherence score, 0-100.")
      .def_property_readonly(
          "clip", [](const ReportObject& r) { return nlohmann::json(r.json().at("clip")); },
          "The clip's facts (path, size, fps, frame_count, codec, ...) as a dict.")
      .def_property_readonly(
          "settings", [](const ReportObject& r) { return nlohmann::json(r.json().at("settings")); },
          "The analysis settings as a dict.")
      .def_property_readonly(
          "segments", [](const ReportObject& r) { return nlohmann::json(r.json().at("segments")); },
          "Incoherent stretches: dicts with metric, start_frame, end_frame (inclusive), "
          "start_s, end_s, peak, peak_frame, severity.")
      .def_property_readonly(
          "summary", [](const ReportObject& r) { return nlohmann::json(r.json().at("summary")); },
          "Per-metric mean/p50/p95/max and details, coherence, stream facts, as a dict.")
      .def_property_readonly(
          "objects", [](const ReportObject& r) { return nlohmann::json(r.json().at("objects")); },
          "Objects followed for drift, as dicts.")
      .def_property_readonly(
          "notes", [](const ReportObject& r) { return r.report().notes; },
          "Cautions, e.g. the photosensitivity note.")
      .def_property_readonly(
          "frame_times", [](const ReportObject& r) { return to_array(r.report().frame_times_s); },
          "Time of each frame in seconds from the first, as a float64 array.")
      .def_property_readonly(
          "metric_names",
          [](const ReportObject& r) {
            std::vector<std::string> names;
            for (const auto& s : r.report().series) names.push_back(s.metric);
            return names;
          },
          "Names of the per-frame metrics, in report order.")
      .def_property_readonly(
          "metrics",
          [](const ReportObject& r) {
            py::dict out;
            for (const auto& s : r.report().series) out[py::str(s.metric)] = to_array(s.values);
            return out;
          },
          "Every per-frame metric as {name: float64 array}, NaN where undefined.")
      .def("metric", &metric_values, py::arg("name"),
           "One per-frame metric as a float64 array (NaN where undefined); KeyError if unknown.")
      .def("__getitem__", &metric_values, py::arg("name"))
      .def("__len__", [](const ReportObject& r) { return r.report().frame_times_s.size(); })
      .def(
          "to_json", [](const ReportObject& r) { return json_text(r); },
          "The JSON text, exactly as `clipwarden analyze` writes DIR/<name>.json.")
      .def(
          "to_dict", [](const ReportObject& r) { return nlohmann::json(r.json()); },
          "The report as a dict (NaN values are None, as in the JSON).")
      .def("save", &save, py::arg("folder"), py::kw_only(), py::arg("html") = true,
           "Writes folder/<name>.json and folder/<name>.html as `clipwarden analyze --out "
           "folder` does; returns {'json': path, 'html': path}.")
      .def("__repr__", [](const ReportObject& r) {
        const Report& rep = r.report();
        return "<clipwarden.Report '" + rep.clip.path + "': " + to_string(rep.verdict.status) +
               ", coherence " + std::to_string(rep.summary.coherence).substr(0, 5) + ", " +
               std::to_string(rep.frame_times_s.size()) + " frames>";
      });

  m.def(
      "read_report",
      [](const py::object& path) {
        Report report = take(read_report_file(path_text(path)));
        const AnalysisSettings settings = cli::settings_from_report(report);
        return ReportObject(std::move(report), settings, nullptr);
      },
      py::arg("path"), "Reads a report JSON written by clipwarden (CLI or Report.save).");
}

}  // namespace clipwarden::python
