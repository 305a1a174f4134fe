// Report JSON: writing, reading back, schema checks. The schema is our own
// contract (docs/report.md); its checker is compared with
// python-jsonschema in tests/reference/schema_reference_test.cpp.
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <fstream>

#include "analyzer/core/assets.h"
#include "clipwarden/report_io.h"
#include "support/clips.h"
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

namespace {

// A 3-frame report in which every field the schema knows has a value other
// than its default, so a field the writer leaves out or the reader drops
// shows as a difference from the hand-written document below.
Report full_report() {
  Report r;
  r.tool_version = "9.8.7";
  r.clip = {"takes/lantern\xff.mp4",  // a name that is not UTF-8: written escaped
            std::string(64, 'b'),
            "matroska,webm",
            "hevc",
            640,
            360,
            3.0,
            3,
            1.0,
            "yuv420p10le",
            10,
            90,
            {true, "opus", 1.25, 0.75}};
  r.settings = {{"preset", "fast"}, {"working_long_side", 320}};
  r.frame_times_s = {0.0, 0.5, 1.0};
  r.series = {{"warp_error", {kUndefined, 0.25, 0.125}}, {"flicker", {0.5, 0.0625, kUndefined}}};
  r.segments = {{"flicker", 0, 1, 0.0, 0.5, 0.5, 0, Severity::reject}};
  r.summary.metrics = {{"warp_error", 0.1875, 0.1875, 0.246875, 0.25},
                       {"flicker", kUndefined, kUndefined, kUndefined, kUndefined}};
  r.summary.coherence = 42.5;
  r.summary.stream = {1.0, 1.25, 0.25, true, 1, 2, 3, 4, 5};
  r.summary.details = {{"flicker", {{"pulses", 2}}}, {"flash", {{"hazard", true}}}};
  // A file storing each of its 3 pictures twice (summary.cadence).
  r.summary.details["cadence"] = {{"stored_frames", 6},   {"pictures", 3},       {"analysed_frames", 3},
                                  {"usual_repeats", 1},   {"repeated_share", 1}, {"content_fps", 3.0},
                                  {"source_frames", {0, 2, 4}}};
  TrackedObject o;
  o.id = 7;
  o.first_frame = 1;
  o.last_frame = 2;
  o.vanished = true;
  o.end_reason = "vanished";
  o.kind = TrackedKind::moving;
  o.reference_frame = 1;
  o.working_width = 320;
  o.working_height = 180;
  TrackedSample first, second;
  first.frame = 1;
  first.box_px = {10, 20, 30, 40};
  first.box_frac = {0.5, 0.25, 0.125, 0.0625};
  first.drift = first.color_de00 = first.own_color_de00 = first.structure = 0;
  first.size_pct = first.size_window_pct = 0;
  first.visible_pct = 100;
  second.frame = 2;
  second.box_px = {12, 20, 30, 40};  // box_frac unknown: written as nulls
  second.drift = 1.5;
  second.color_de00 = 3.5;
  second.own_color_de00 = 2.5;
  second.structure = 0.25;
  second.size_pct = -12.5;
  second.size_window_pct = -6.25;
  second.visible_pct = 50;
  o.samples = {first, second};
  o.peak_drift = 1.5;
  o.peak_frame = 2;
  o.drift_rate_per_s = 3;
  o.color_de00_rate_per_s = 7;
  o.drift_segments = {{1, 2, 0.5, 1, 1.5, 2, "own_color"}};
  r.objects = {o};
  r.verdict = {Verdict::reject, {"flicker segment peak 0.5 >= reject 0.1 (frame 0, 0.00 s)"}};
  r.notes = {"a note"};
  return r;
}

// The report above as docs/ and report/schema describe it, written by hand:
// frames row-wise with null for undefined values, a summary entry per metric
// with its details, details of a metric without a series on their own.
const char* kFullReportJson = R"json({
  "schema": "clipwarden.report/1",
  "tool": {"name": "clipwarden", "version": "9.8.7"},
  "clip": {"path": "takes/lantern\\xff.mp4", "path_escaped": true, "sha256": "bbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbb",
           "container": "matroska,webm", "codec": "hevc", "width": 640, "height": 360, "fps": 3.0,
           "frame_count": 3, "duration_s": 1.0, "pix_fmt": "yuv420p10le", "bit_depth": 10, "rotation": 90,
           "audio": {"present": true, "codec": "opus", "duration_s": 1.25, "silent_from_s": 0.75}},
  "settings": {"preset": "fast", "working_long_side": 320},
  "frames": [{"index": 0, "t": 0.0, "warp_error": null, "flicker": 0.5},
             {"index": 1, "t": 0.5, "warp_error": 0.25, "flicker": 0.0625},
             {"index": 2, "t": 1.0, "warp_error": 0.125, "flicker": null}],
  "segments": [{"metric": "flicker", "start_frame": 0, "end_frame": 1, "start_s": 0.0, "end_s": 0.5,
                "peak": 0.5, "peak_frame": 0, "severity": "reject"}],
  "summary": {"warp_error": {"mean": 0.1875, "p50": 0.1875, "p95": 0.246875, "max": 0.25},
              "flicker": {"mean": null, "p50": null, "p95": null, "max": null, "details": {"pulses": 2}},
              "flash": {"details": {"hazard": true}},
              "cadence": {"details": {"stored_frames": 6, "pictures": 3, "analysed_frames": 3, "usual_repeats": 1,
                                      "repeated_share": 1, "content_fps": 3.0, "source_frames": [0, 2, 4]}},
              "coherence": 42.5,
              "stream": {"video_duration_s": 1.0, "audio_duration_s": 1.25, "mismatch_s": 0.25, "vfr": true,
                         "dropped_frames": 1, "duplicate_timestamps": 2, "decode_errors": 3,
                         "concealed_frames": 4, "lost_frames": 5}},
  "objects": [{"id": 7, "first_frame": 1, "last_frame": 2, "vanished": true, "end_reason": "vanished",
    "kind": "moving", "reference_frame": 1, "working_size": [320, 180], "frames": [1, 2],
    "boxes": [[1, 10, 20, 30, 40], [2, 12, 20, 30, 40]], "boxes_frac": [[1, 0.5, 0.25, 0.125, 0.0625], [2, null, null, null, null]],
    "drift": [0, 1.5], "color_de00": [0, 3.5], "own_color_de00": [0, 2.5], "structure": [0, 0.25], "size_pct": [0, -12.5],
    "size_window_pct": [0, -6.25], "visible_pct": [100, 50], "peak_drift": 1.5, "peak_frame": 2,
    "drift_rate_per_s": 3, "color_de00_rate_per_s": 7,
    "drift_segments": [{"start_frame": 1, "end_frame": 2, "start_s": 0.5, "end_s": 1, "peak": 1.5, "peak_frame": 2,
                        "aspect": "own_color"}]}],
  "verdict": {"status": "reject", "reasons": ["flicker segment peak 0.5 >= reject 0.1 (frame 0, 0.00 s)"]},
  "notes": ["a note"]
})json";

// Every property the schema declares at `schema` is present in `doc`
// (recursively, through arrays' items): a field in the contract that the
// writer never writes fails here. `where` names the path for the message.
void expect_every_declared_property(const nlohmann::json& schema, const nlohmann::json& doc,
                                    const std::string& where) {
  if (schema.contains("properties") && doc.is_object()) {
    for (const auto& [key, sub] : schema["properties"].items()) {
      if (!doc.contains(key)) {
        ADD_FAILURE() << where << "." << key << " is declared by the schema but not written";
        continue;
      }
      expect_every_declared_property(sub, doc[key], where + "." + key);
    }
  }
  if (schema.contains("items") && doc.is_array())
    for (size_t i = 0; i < doc.size(); ++i)
      expect_every_declared_property(schema["items"], doc[i],
                                     where + "[" + std::to_string(i) + "]");
}

}  // namespace

TEST(ReportJson, WriterWritesTheHandWrittenDocument) {
  const nlohmann::json written = report_to_json(full_report());
  EXPECT_EQ(written, nlohmann::json::parse(kFullReportJson)) << written.dump(1);
  auto valid = validate_report_json(written, "full");
  EXPECT_TRUE(valid.ok()) << (valid.ok() ? "" : valid.error().message());
  expect_every_declared_property(nlohmann::json::parse(asset("clipwarden.report-1.schema.json")),
                                 written, "$");
}

TEST(ReportJson, ReaderKeepsEveryFieldOfTheHandWrittenDocument) {
  // Read from the hand-written text, not from our writer's output; every
  // value differs from its default, so a dropped field shows.
  const nlohmann::json expected = nlohmann::json::parse(kFullReportJson);
  auto back = report_from_json(expected, "full.json");
  ASSERT_TRUE(back.ok()) << back.error().message();
  EXPECT_EQ(back->clip.audio.silent_from_s, 0.75);
  EXPECT_EQ(back->clip.bit_depth, 10);
  EXPECT_EQ(back->summary.stream.duplicate_timestamps, 2);
  EXPECT_EQ(back->summary.stream.lost_frames, 5);
  EXPECT_EQ(back->clip.path, "takes/lantern\xff.mp4");
  EXPECT_EQ(back->objects.at(0).peak_drift, 1.5);
  EXPECT_EQ(back->objects.at(0).samples.at(1).box_px.x, 12);
  EXPECT_TRUE(std::isnan(back->objects.at(0).samples.at(1).box_frac.x));
  EXPECT_EQ(back->notes, std::vector<std::string>{"a note"});
  EXPECT_EQ(report_to_json(*back), expected);
}

// A file name is bytes: one that is not UTF-8 is written escaped with a
// flag (the JSON stays valid) and read back byte for byte; the decoder's
// complaints survive the round trip too.
TEST(ReportJson, PathThatIsNotUtf8AndDecoderCountsRoundTrip) {
  Report r = fixtures::small_report();
  r.clip.path = std::string("shots/take\xff_\\_caf\xe9.mp4");
  r.summary.stream.decode_errors = 6;
  r.summary.stream.concealed_frames = 3;
  r.summary.stream.lost_frames = 1;
  const auto j = report_to_json(r);
  EXPECT_EQ(j["clip"]["path"], "shots/take\\xff_\\\\_caf\\xe9.mp4");
  EXPECT_EQ(j["clip"]["path_escaped"], true);
  EXPECT_TRUE(validate_report_json(j, "escaped").ok());
  const std::string text = j.dump();  // would throw type_error 316 on raw 0xFF
  auto back = report_from_json(nlohmann::json::parse(text), "mem");
  ASSERT_TRUE(back.ok()) << back.error().message();
  EXPECT_EQ(back->clip.path, r.clip.path);
  EXPECT_EQ(back->summary.stream.decode_errors, 6);
  EXPECT_EQ(back->summary.stream.concealed_frames, 3);
  EXPECT_EQ(back->summary.stream.lost_frames, 1);

  Report plain = fixtures::small_report();
  EXPECT_FALSE(report_to_json(plain)["clip"].contains("path_escaped"));
  auto old = report_to_json(plain);  // a report written before the counts existed
  old["summary"]["stream"].erase("lost_frames");
  auto read_old = report_from_json(old, "old.json");
  ASSERT_TRUE(read_old.ok()) << read_old.error().message();
  EXPECT_EQ(read_old->summary.stream.lost_frames, 0);
}

TEST(ReportJson, ReaderNamesTheBadKey) {
  auto j = report_to_json(fixtures::small_report());
  j["segments"][0].erase("end_frame");
  auto back = report_from_json(j, "x.json");
  ASSERT_FALSE(back.ok());
  EXPECT_EQ(back.error().message(), "x.json: report key 'segments[0].end_frame' is missing");
}

// A tracked object's per-sample arrays line up with its frames; a report
// where they do not (or a box row names another frame) is refused by key,
// and one written before own_color_de00 existed still reads.
TEST(ReportJson, TrackedObjectArraysMustLineUpWithFrames) {
  const nlohmann::json good = nlohmann::json::parse(kFullReportJson);
  auto short_column = good;
  short_column["objects"][0]["drift"].erase(1);
  auto back = report_from_json(short_column, "x.json");
  ASSERT_FALSE(back.ok());
  EXPECT_EQ(back.error().message(),
            "x.json: report key 'objects[0].drift' does not have one entry per frames[] entry");
  auto other_frame = good;
  other_frame["objects"][0]["boxes"][1][0] = 5;
  back = report_from_json(other_frame, "x.json");
  ASSERT_FALSE(back.ok());
  EXPECT_EQ(back.error().message(),
            "x.json: report key 'objects[0].boxes[1]' names a frame other than frames[] at the same place");
  auto older = good;
  older["objects"][0].erase("own_color_de00");
  back = report_from_json(older, "old.json");
  ASSERT_TRUE(back.ok()) << back.error().message();
  EXPECT_TRUE(std::isnan(back->objects.at(0).samples.at(1).own_color_de00));
  EXPECT_EQ(back->objects.at(0).samples.at(1).color_de00, 3.5);
}

TEST(ReportJson, AtomicWriteReplacesWholeFiles) {
  const test::TempDir temp;
  const std::filesystem::path& dir = temp.path();
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
}
