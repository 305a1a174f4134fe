// Our schema checker (report/json/schema_check.*) against an outside
// implementation of JSON Schema draft-07: python3-jsonschema from Debian,
// run through /usr/bin/python3. Both must agree on valid and broken reports.
#include <gtest/gtest.h>

#include <cstdio>
#include <filesystem>
#include <fstream>

#include "analyzer/core/assets.h"
#include "clipwarden/report_io.h"
#include "report/json/schema_check.h"
#include "support/report_fixtures.h"

using namespace clipwarden;
using nlohmann::json;

namespace {
bool python_jsonschema_available() {
  return std::system("/usr/bin/python3 -c 'import jsonschema' >/dev/null 2>&1") == 0;
}
// 1 = valid, 0 = invalid, per python-jsonschema.
int python_verdict(const json& doc, const std::string& dir) {
  const std::string doc_path = dir + "/doc.json";
  const std::string schema_path = dir + "/schema.json";
  std::ofstream(doc_path) << doc.dump();
  std::ofstream(schema_path) << asset("clipwarden.report-1.schema.json");
  const std::string cmd = "/usr/bin/python3 -c \"import json,sys,jsonschema; "
                          "s=json.load(open(sys.argv[1])); d=json.load(open(sys.argv[2])); "
                          "sys.exit(0 if jsonschema.Draft7Validator(s).is_valid(d) else 1)\" " +
                          schema_path + " " + doc_path;
  return std::system(cmd.c_str()) == 0 ? 1 : 0;
}
}  // namespace

TEST(SchemaReference, AgreesWithPythonJsonschema) {
  if (!python_jsonschema_available()) GTEST_SKIP() << "python3-jsonschema not installed (/usr/bin/python3)";
  const auto dir = std::filesystem::temp_directory_path() / ("clipwarden-schema-" + std::to_string(::getpid()));
  std::filesystem::create_directories(dir);
  const json good = report_to_json(fixtures::small_report());
  std::vector<json> docs = {good};
  auto mutate = [&](auto f) {
    json d = good;
    f(d);
    docs.push_back(d);
  };
  mutate([](json& d) { d["segments"][0]["severity"] = "fatal"; });
  mutate([](json& d) { d["frames"][2]["flicker"] = "x"; });
  mutate([](json& d) { d["clip"].erase("fps"); });
  mutate([](json& d) { d["summary"]["coherence"] = 101; });
  mutate([](json& d) { d["clip"]["width"] = 3.5; });
  mutate([](json& d) { d["verdict"]["status"] = "maybe"; });
  mutate([](json& d) { d["frames"][1]["new_metric"] = nullptr; });  // allowed
  mutate([](json& d) { d["summary"]["drift"] = {{"p95", nullptr}}; });  // allowed
  mutate([](json& d) { d["summary"]["stream"]["vfr"] = 1; });
  const json schema = json::parse(asset("clipwarden.report-1.schema.json"));
  for (size_t i = 0; i < docs.size(); ++i) {
    const bool ours = check_against_schema(docs[i], schema, "doc").ok();
    EXPECT_EQ(ours ? 1 : 0, python_verdict(docs[i], dir.string())) << "document " << i;
  }
  std::filesystem::remove_all(dir);
}
