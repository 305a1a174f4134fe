// Fuzz target: reading a report as compare and merge do (report_from_json,
// read_report_file's JSON step) and the schema check (validate_report_json).
// A report that reads back must be written and read again without error.
// Input errors are the expected answer to bad text.
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <string>

#include "clipwarden/report_io.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const auto json = nlohmann::json::parse(data, data + size, nullptr, /*allow_exceptions=*/false);
  if (json.is_discarded()) return 0;
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
