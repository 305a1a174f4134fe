// The files `clipwarden compare` and `clipwarden inject` write are valid
// under their JSON Schemas (report/schema/clipwarden.compare-1.schema.json,
// clipwarden.inject-truth-1.schema.json), checked by an outside
// implementation of JSON Schema draft-07: python3-jsonschema from Debian. A
// document with a field the schema does not state, or a wrong value, must be
// refused, so a writer that adds a field without stating it fails here.
#include <gtest/gtest.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <random>

#include "support/clips.h"
#include "support/compare_cli.h"
#include "support/compare_python.h"
#include "support/compare_reports.h"
#include "support/inject_clips.h"

using nlohmann::json;

namespace {

// python3-jsonschema's verdict on each document: true = valid.
std::vector<bool> python_verdicts(const std::string& schema_file, const std::vector<json>& docs) {
  std::ifstream in(std::string(CLIPWARDEN_SOURCE_DIR) + "/report/schema/" + schema_file);
  const json schema = json::parse(in, nullptr, false);
  EXPECT_FALSE(schema.is_discarded()) << schema_file;
  const char* script =
      "import json, sys, jsonschema\n"
      "d = json.load(open(sys.argv[1]))\n"
      "v = jsonschema.Draft7Validator(d['schema'])\n"
      "print(json.dumps([v.is_valid(x) for x in d['docs']]))\n";
  std::string error;
  const json out =
      clipwarden::test::run_python_json(script, {{"schema", schema}, {"docs", docs}}, error);
  EXPECT_FALSE(out.is_discarded()) << error;
  std::vector<bool> verdicts;
  if (!out.is_discarded())
    for (const auto& v : out) verdicts.push_back(v.get<bool>());
  return verdicts;
}

bool python_jsonschema_usable() {
  return std::system("/usr/bin/python3 -c 'import jsonschema' >/dev/null 2>&1") == 0;
}

json read_json(const std::string& path) {
  std::ifstream in(path);
  return json::parse(in, nullptr, false);
}

}  // namespace

TEST(OutputSchema, CompareJsonIsValid) {
  if (!python_jsonschema_usable())
    GTEST_SKIP() << "python3-jsonschema not installed (/usr/bin/python3)";
  clipwarden::test::TempFolder root("compare-schema");
  const std::string a = root.file("A"), b = root.file("B"), out = root.file("out");
  std::filesystem::create_directories(a);
  std::filesystem::create_directories(b);
  std::mt19937_64 rng(11);
  const auto levels = clipwarden::test::draw_prompt_levels(rng, 7);
  for (int i = 0; i < 6; ++i) {
    const std::string name = "p" + std::to_string(i);
    clipwarden::test::write_synthetic_report(
        clipwarden::test::scenario_clip(rng, levels[i], "a/" + name + ".mp4", false),
        a + "/" + name + ".json");
    clipwarden::test::write_synthetic_report(
        clipwarden::test::scenario_clip(rng, levels[i], "b/" + name + ".mp4", i % 2 == 0),
        b + "/" + name + ".json");
  }
  // One unpaired report and one unreadable file, so every list has an entry.
  clipwarden::test::write_synthetic_report(
      clipwarden::test::scenario_clip(rng, levels[6], "a/x.mp4", false), a + "/only_in_a.json");
  std::ofstream(b + "/broken.json") << "{ not json";
  const auto q = clipwarden::test::shell_quoted;
  clipwarden::test::run_compare(q(a) + " " + q(b) + " --out " + q(out) +
                                " --quiet --stat p95 --stat max");
  const json doc = read_json(out + "/compare.json");
  ASSERT_FALSE(doc.is_discarded());
  ASSERT_FALSE(doc["pairs"].empty());
  ASSERT_FALSE(doc["unpaired"].empty());
  ASSERT_FALSE(doc["failed"].empty());

  json extra_field = doc, bad_better = doc, missing = doc;
  extra_field["metrics"][0]["undocumented"] = 1;
  bad_better["metrics"][0]["better"] = "both";
  missing.erase("pair_by");
  EXPECT_EQ(
      python_verdicts("clipwarden.compare-1.schema.json", {doc, extra_field, bad_better, missing}),
      (std::vector<bool>{true, false, false, false}));
}

TEST(OutputSchema, InjectTruthIsValid) {
  if (!python_jsonschema_usable())
    GTEST_SKIP() << "python3-jsonschema not installed (/usr/bin/python3)";
  const clipwarden::test::TempDir dir;
  auto clean = clipwarden::test::write_synthetic_clip(dir.file("clean.mkv"), {96, 64}, 30, 15);
  ASSERT_TRUE(clean.ok()) << clean.error().message();
  // A class with a region (its box and track) and one without.
  const auto r = clipwarden::test::run_command({CLIPWARDEN_BINARY, "inject", *clean, "--defect",
                                                "local_flicker@5-12", "--defect", "drop@20", "-o",
                                                dir.file("out.mkv"), "--codec", "ffv1", "--quiet"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const json doc = read_json(dir.file("out.truth.json"));
  ASSERT_FALSE(doc.is_discarded());
  json extra_field = doc, bad_class = doc;
  extra_field["defects"][0]["undocumented"] = 1;
  bad_class["defects"][1]["class"] = "wobble";
  std::vector<json> docs = {doc, extra_field, bad_class};
  // The demo clips' truth files (clips/README.md) claim the same schema.
  for (const char* name : {"lanternfish_flicker", "lanternfish_drift", "lanternfish_jump"})
    docs.push_back(
        read_json(std::string(CLIPWARDEN_SOURCE_DIR) + "/clips/" + name + ".truth.json"));
  EXPECT_EQ(python_verdicts("clipwarden.inject-truth-1.schema.json", docs),
            (std::vector<bool>{true, false, false, true, true, true}));
}
