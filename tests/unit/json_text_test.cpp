// One JSON reader for every file the tool reads: nesting is capped (a
// policy of 60,000 nested objects ended the program with a segmentation
// fault) and a key repeated in one object is an error naming the key.
#include <gtest/gtest.h>

#include "analyzer/core/json_text.h"
#include "clipwarden/gate.h"
#include "clipwarden/policy.h"
#include "clipwarden/report_io.h"
#include "support/clips.h"
#include "support/gate_files.h"

using namespace clipwarden;

namespace {

std::string nested(int levels, const std::string& inner = "{}") {
  std::string text;
  for (int i = 0; i < levels; ++i) text += "{\"a\":";
  text += inner;
  text.append(static_cast<size_t>(levels), '}');
  return text;
}

}  // namespace

TEST(JsonText, NestingDeeperThanTheLimitIsAnError) {
  EXPECT_TRUE(parse_json_text(nested(kMaxJsonDepth - 1), "ok.json", ErrorKind::usage));
  auto deep = parse_json_text(nested(kMaxJsonDepth + 1), "deep.json", ErrorKind::usage);
  ASSERT_FALSE(deep);
  EXPECT_EQ(deep.error().kind, ErrorKind::usage);
  EXPECT_EQ(deep.error().message(), "deep.json: nests deeper than 64 levels");
  std::string arrays(100000, '[');
  arrays += std::string(100000, ']');
  EXPECT_FALSE(parse_json_text(arrays, "arrays.json", ErrorKind::input));
}

TEST(JsonText, RepeatedKeyIsAnErrorNamingIt) {
  auto dup = parse_json_text(R"({"a": {"id": 1, "id": 2}})", "m.jsonl:3", ErrorKind::usage);
  ASSERT_FALSE(dup);
  EXPECT_EQ(dup.error().message(), "m.jsonl:3: repeats the key \"id\" in one object");
  EXPECT_TRUE(parse_json_text(R"({"a": {"id": 1}, "b": {"id": 2}})", "x", ErrorKind::usage));
  EXPECT_TRUE(parse_json_text(R"([{"id": 1}, {"id": 2}])", "x", ErrorKind::usage));
  auto bad = parse_json_text("{\"a\": 1e400}", "big.json", ErrorKind::usage);
  ASSERT_FALSE(bad);
  EXPECT_NE(bad.error().cause.find("not valid JSON"), std::string::npos);
}

// Every reader goes through it: policy, manifest, report (and queue, in merge).
TEST(JsonText, PolicyManifestAndReportReadersRefuseDeepNesting) {
  const std::string deep = "{\"metrics\": " + nested(60000) + "}";
  auto policy = parse_policy(deep, "deep_policy.json");
  ASSERT_FALSE(policy);
  EXPECT_EQ(policy.error().kind, ErrorKind::usage);
  EXPECT_NE(policy.error().cause.find("nests deeper"), std::string::npos) << policy.error().cause;
  auto dup_policy = parse_policy(R"({"name": "a", "name": "b"})", "dup.json");
  ASSERT_FALSE(dup_policy);
  EXPECT_NE(dup_policy.error().cause.find("\"name\""), std::string::npos);

  test::TempDir dir;
  const auto manifest = dir.path() / "deep.jsonl";
  test::write_text(manifest, "{\"path\": \"a.mp4\", \"note\": " + nested(60000) + "}\n");
  auto inputs = collect_inputs({manifest.string()});
  ASSERT_FALSE(inputs);
  EXPECT_EQ(inputs.error().kind, ErrorKind::usage);
  EXPECT_NE(inputs.error().message().find("deep.jsonl:1"), std::string::npos);

  const auto report = dir.path() / "deep.json";
  test::write_text(report,
                   "{\"schema\": \"clipwarden.report/1\", \"settings\": " + nested(60000) + "}");
  auto read = read_report_file(report.string());
  ASSERT_FALSE(read);
  EXPECT_NE(read.error().cause.find("nests deeper"), std::string::npos) << read.error().cause;
}
