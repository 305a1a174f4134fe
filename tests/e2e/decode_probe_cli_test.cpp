// `clipwarden probe` end to end: JSON on stdout with the report's clip keys
// plus "stream" (docs/cli.md: probe prints what the container holds); bad
// input gives exit status 3 and one line on stderr naming the file.
#include <gtest/gtest.h>

#include <fstream>

#include <nlohmann/json.hpp>

#include "support/clips.h"

using namespace clipwarden::test;

TEST(ProbeCli, PrintsClipFactsAsJson) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::string clip = dir.file("harbour.mp4");
  ASSERT_EQ(make_lavfi_clip(clip, "testsrc2=size=160x120:rate=24:duration=1", {"-c:v", "libx264"}),
            "");
  const CommandResult r = run_command({CLIPWARDEN_BINARY, "probe", clip});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto json = nlohmann::json::parse(r.out);
  for (const char* key :
       {"path", "sha256", "container", "codec", "width", "height", "fps", "frame_count",
        "duration_s", "pix_fmt", "bit_depth", "rotation", "audio", "stream"})
    EXPECT_TRUE(json.contains(key)) << key;
  for (const char* key : {"video_duration_s", "audio_duration_s", "mismatch_s", "vfr",
                          "dropped_frames", "duplicate_timestamps"})
    EXPECT_TRUE(json["stream"].contains(key)) << key;
  EXPECT_EQ(json["frame_count"], 24);
  EXPECT_EQ(json["width"], 160);
  EXPECT_EQ(json["codec"], "h264");
  EXPECT_EQ(json["sha256"].get<std::string>().size(), 64u);
}

TEST(ProbeCli, BadInputIsOneLineAndExitStatus3) {
  TempDir dir;
  const std::string text = dir.file("notes.mp4");
  std::ofstream(text) << "not a clip\n";
  for (const std::string& path : {text, dir.file("missing.webm"), dir.path().string()}) {
    const CommandResult r = run_command({CLIPWARDEN_BINARY, "probe", path});
    EXPECT_EQ(r.exit_code, 3) << path;
    EXPECT_TRUE(r.out.empty()) << r.out;
    ASSERT_FALSE(r.err.empty());
    EXPECT_EQ(r.err.find('\n'), r.err.size() - 1) << "more than one line: " << r.err;
    EXPECT_NE(r.err.find(path), std::string::npos) << r.err;
  }
}
