// Reading and writing reports. JSON follows report/schema/
// clipwarden.report-1.schema.json; the HTML page is self-contained.
#pragma once

#include <string>

#include <nlohmann/json.hpp>

#include "clipwarden/error.h"
#include "clipwarden/report.h"

namespace clipwarden {

nlohmann::json report_to_json(const Report& report);
// Reads a report written by report_to_json (used by gate, merge, compare).
// Errors name `subject` and the offending key.
Expected<Report> report_from_json(const nlohmann::json& json, const std::string& subject);
Expected<Report> read_report_file(const std::string& path);

// Checks a report's JSON against report/schema/clipwarden.report-1.schema.json
// (compiled into the library); the error names the first offending path.
Status validate_report_json(const nlohmann::json& report, const std::string& subject);

// Writes `content` to `path` atomically: a temporary file in the same folder,
// flushed, then renamed over the target. Readers never see half a file.
Status write_file_atomic(const std::string& path, const std::string& content);

// The report's JSON text, pretty-printed, written atomically.
Status write_json_report(const Report& report, const std::string& path);

}  // namespace clipwarden
