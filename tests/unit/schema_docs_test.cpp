// The documents state every field their JSON Schema knows: each property
// name anywhere in report/schema/*.schema.json appears, in backticks, in the
// page that documents that file. A field added to a schema without a word
// in the docs fails here (the schemas themselves are checked against the
// written files in SchemaReference.* and OutputSchema.*).
#include <gtest/gtest.h>

#include <set>

#include <nlohmann/json.hpp>

#include "support/source_files.h"

namespace {

using clipwarden::test::read_source_file;

// Every property name declared in `schema`, at any depth.
void collect_properties(const nlohmann::json& schema, std::set<std::string>& out) {
  if (!schema.is_object()) return;
  if (auto p = schema.find("properties"); p != schema.end() && p->is_object())
    for (const auto& [name, sub] : p->items()) {
      out.insert(name);
      collect_properties(sub, out);
    }
  for (const char* key : {"items", "additionalProperties"})
    if (auto s = schema.find(key); s != schema.end()) collect_properties(*s, out);
  if (auto d = schema.find("definitions"); d != schema.end() && d->is_object())
    for (const auto& [name, sub] : d->items()) collect_properties(sub, out);
  for (const char* key : {"oneOf", "anyOf", "allOf"})
    if (auto list = schema.find(key); list != schema.end() && list->is_array())
      for (const auto& sub : *list) collect_properties(sub, out);
}

void expect_documented(const std::string& schema_file, const std::string& doc_file) {
  const auto schema =
      nlohmann::json::parse(read_source_file("report/schema/" + schema_file), nullptr, false);
  ASSERT_FALSE(schema.is_discarded()) << schema_file;
  std::set<std::string> names;
  collect_properties(schema, names);
  ASSERT_GT(names.size(), 10u) << schema_file;
  const std::string doc = read_source_file(doc_file);
  for (const auto& name : names)
    EXPECT_NE(doc.find("`" + name + "`"), std::string::npos)
        << schema_file << ": `" << name << "` not in " << doc_file;
}

}  // namespace

TEST(SchemaDocs, ReportFieldsAreDocumented) {
  expect_documented("clipwarden.report-1.schema.json", "docs/report.md");
}

TEST(SchemaDocs, CompareFieldsAreDocumented) {
  expect_documented("clipwarden.compare-1.schema.json", "docs/compare.md");
}

TEST(SchemaDocs, InjectTruthFieldsAreDocumented) {
  expect_documented("clipwarden.inject-truth-1.schema.json", "docs/inject.md");
}
