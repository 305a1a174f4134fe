// Inputs the fuzz targets (tests/fuzz) found mishandled, reduced to their
// essence: each must now be a clean error or a clean answer, never undefined
// behaviour. Run under the sanitizer build (DEVELOPERS.md, "Fuzzing and
// sanitizers") these fail loudly if the fix regresses.
#include <gtest/gtest.h>

#include <string>

#include "clipwarden/gate.h"
#include "clipwarden/policy.h"
#include "clipwarden/report_io.h"
#include "support/clips.h"
#include "support/gate_files.h"
#include "support/report_fixtures.h"

using namespace clipwarden;
using nlohmann::json;

// report_from_json cast JSON numbers to int/int64_t unchecked: 1e300, -1e300,
// 2.5, null and 2^31 in an integer field were undefined behaviour.
TEST(FuzzFindings, ReportIntegerFieldsOutOfRangeAreErrorsNamingTheKey) {
  const json good = report_to_json(fixtures::small_report());
  ASSERT_TRUE(report_from_json(good, "good.json"));
  const std::vector<std::pair<json::json_pointer, json>> cases = {
      {json::json_pointer("/clip/width"), 1e300},
      {json::json_pointer("/clip/height"), -1e300},
      {json::json_pointer("/clip/rotation"), 2.5},
      {json::json_pointer("/clip/width"), nullptr},
      {json::json_pointer("/clip/width"), 2147483648.0},
      {json::json_pointer("/clip/frame_count"), 9.3e18},
      {json::json_pointer("/segments/0/start_frame"), 1e19},
  };
  for (const auto& [where, value] : cases) {
    json bad = good;
    ASSERT_TRUE(bad.contains(where)) << where.to_string();
    bad[where] = value;
    auto read = report_from_json(bad, "bad.json");
    ASSERT_FALSE(read) << where.to_string() << " = " << value.dump();
    EXPECT_EQ(read.error().subject, "bad.json");
    EXPECT_NE(read.error().cause.find(where.back()), std::string::npos) << read.error().cause;
  }
  json edge = good;
  edge["/clip/frame_count"_json_pointer] = 4.0e18;  // whole and in range: accepted
  edge["/clip/width"_json_pointer] = 2147483647.0;
  auto read = report_from_json(edge, "edge.json");
  ASSERT_TRUE(read) << read.error().message();
  EXPECT_EQ(read->clip.frame_count, int64_t{4000000000000000000});
  EXPECT_EQ(read->clip.width, 2147483647);
}

// The schema's "integer" test cast the number to int64_t: 1e300 was
// undefined behaviour. A huge whole number is an integer to JSON Schema; a
// fraction is not.
TEST(FuzzFindings, SchemaIntegerCheckTakesHugeAndFractionalNumbers) {
  const json good = report_to_json(fixtures::small_report());
  ASSERT_TRUE(validate_report_json(good, "good.json"));
  json fractional = good;
  fractional["/clip/width"_json_pointer] = 64.5;
  auto checked = validate_report_json(fractional, "f.json");
  ASSERT_FALSE(checked);
  EXPECT_NE(checked.error().cause.find("$.clip.width"), std::string::npos) << checked.error().cause;
  json huge = good;
  huge["/clip/width"_json_pointer] = 1e300;
  (void)validate_report_json(huge, "h.json");  // any answer; no undefined behaviour
}

// Found while writing the manifest target: a manifest id above INT64_MAX was
// read as int64_t, so 18446744073709551615 became "-1" and collided with -1.
TEST(FuzzFindings, HugeUnsignedManifestIdsKeepTheirDigits) {
  test::TempDir dir;
  const std::string manifest = dir.file("m.jsonl");
  test::write_text(manifest,
                   "{\"path\": \"a.mp4\", \"id\": 18446744073709551615}\n"
                   "{\"path\": \"b.mp4\", \"id\": -1, \"prompt_id\": 9223372036854775808}\n");
  auto got = collect_inputs({manifest});
  ASSERT_TRUE(got) << got.error().message();
  ASSERT_EQ(got->inputs.size(), 2u);
  EXPECT_EQ(got->inputs[0].id, "18446744073709551615");
  EXPECT_EQ(got->inputs[1].id, "-1");
  EXPECT_EQ(got->inputs[1].prompt_id, "9223372036854775808");
}

// The policy fuzz target: a number too large for a double made the JSON
// parser throw out_of_range, which parse_policy did not catch (the program
// ended). Now a usage error naming the file.
TEST(FuzzFindings, PolicyWithAnOverflowingNumberIsAUsageError) {
  for (const std::string text : {std::string(R"({"name": 4e4666666666})"),
                                 std::string(R"({"rules": {"coherence_review_below": -1e400}})")}) {
    auto policy = parse_policy(text, "p.json");
    ASSERT_FALSE(policy) << text;
    EXPECT_EQ(policy.error().kind, ErrorKind::usage);
    EXPECT_EQ(policy.error().subject, "p.json");
  }
}
