// Fuzz target: reading a report as compare and merge do (read_report_file's
// JSON step, parse_json_text with its nesting limit, then report_from_json)
// and the schema check (validate_report_json).
// A report that reads back must be written and read again without error.
// Input errors are the expected answer to bad text.
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <string>

#include "analyzer/core/json_text.h"
#include "clipwarden/report_io.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const auto parsed =
      clipwarden::parse_json_text(std::string_view(reinterpret_cast<const char*>(data), size),
                                  "fuzz.json", clipwarden::ErrorKind::input);
  if (!parsed) return 0;
  const nlohmann::json& json = *parsed;
  (void)clipwarden::validate_report_json(json, "fuzz.json");
  auto report = clipwarden::report_from_json(json, "fuzz.json");
  if (!report) return 0;
  const nlohmann::json written = clipwarden::report_to_json(*report);
  auto again = clipwarden::report_from_json(written, "written.json");
  if (!again) {
    std::fprintf(stderr, "report_fuzz: a report read back does not read again: %s\n%s\n",
                 again.error().cause.c_str(), written.dump().c_str());
    std::abort();
  }
  return 0;
}
