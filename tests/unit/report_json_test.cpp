// Report JSON: writing, reading back, schema checks. The schema is our own
// contract (DESIGN.md "The per-clip report"); its checker is compared with
// python-jsonschema in tests/reference/schema_reference_test.cpp.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>

#include "clipwarden/report_io.h"
#include "support/report_fixtures.h"

using namespace clipwarden;

TEST(ReportJson, WrittenReportMatchesTheSchema) {
  const Report r = fixtures::small_report();
  const auto j = report_to_json(r);
  EXPECT_EQ(j["schema"], "clipwarden.report/1");
  EXPECT_TRUE(j["frames"][0]["warp_error"].is_null());
  EXPECT_EQ(j["frames"].size(), 10u);
  auto ok = validate_report_json(j, "small");
  EXPECT_TRUE(ok.ok()) << (ok.ok() ? "" : ok.error().message());
}

TEST(ReportJson, SchemaViolationsNameThePath) {
  auto j = report_to_json(fixtures::small_report());
  j["segments"][0]["severity"] = "fatal";
  auto bad = validate_report_json(j, "r.json");
  ASSERT_FALSE(bad.ok());
  EXPECT_NE(bad.error().message().find("$.segments[0].severity"), std::string::npos) << bad.error().message();
  j = report_to_json(fixtures::small_report());
  j["frames"][3]["flicker"] = "high";
  bad = validate_report_json(j, "r.json");
  ASSERT_FALSE(bad.ok());
  EXPECT_NE(bad.error().message().find("$.frames[3].flicker"), std::string::npos);
  j = report_to_json(fixtures::small_report());
  j["clip"].erase("sha256");
  EXPECT_FALSE(validate_report_json(j, "r.json").ok());
}

TEST(ReportJson, RoundTripKeepsEveryField) {
  const Report r = fixtures::small_report();
  auto back = report_from_json(report_to_json(r), "mem");
  ASSERT_TRUE(back.ok()) << back.error().message();
  EXPECT_EQ(report_to_json(*back), report_to_json(r));
}

TEST(ReportJson, ReaderNamesTheBadKey) {
  auto j = report_to_json(fixtures::small_report());
  j["segments"][0].erase("end_frame");
  auto back = report_from_json(j, "x.json");
  ASSERT_FALSE(back.ok());
  EXPECT_EQ(back.error().message(), "x.json: report key 'segments[0].end_frame' is missing");
}

TEST(ReportJson, AtomicWriteReplacesWholeFiles) {
  const auto dir = std::filesystem::temp_directory_path() / ("clipwarden-atomic-" + std::to_string(::getpid()));
  std::filesystem::create_directories(dir);
  const std::string path = (dir / "r.json").string();
  ASSERT_TRUE(write_file_atomic(path, "first").ok());
  ASSERT_TRUE(write_file_atomic(path, "second").ok());
  std::ifstream in(path);
  std::string content((std::istreambuf_iterator<char>(in)), {});
  EXPECT_EQ(content, "second");
  size_t files = 0;
  for (auto& e : std::filesystem::directory_iterator(dir)) files += e.is_regular_file();
  EXPECT_EQ(files, 1u) << "no temporary file may be left behind";
  EXPECT_FALSE(write_file_atomic((dir / "missing" / "r.json").string(), "x").ok());
  std::filesystem::remove_all(dir);
}
