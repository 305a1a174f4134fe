// Shared test helpers for anything that needs real clips: temporary folders,
// running outside tools (ffmpeg, ffprobe, /usr/bin/python3), making small
// clips from FFmpeg's lavfi test sources, reading FFmpeg's own per-frame
// answers, and finding the opencv-doc sample footage.
//
//   clipwarden::test::TempDir dir;
//   CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
//   std::string clip = dir.file("a.mp4");
//   ASSERT_TRUE(make_lavfi_clip(clip, "testsrc2=size=160x120:rate=24:duration=2",
//                               {"-c:v", "libx264", "-pix_fmt", "yuv420p"}).empty());
//   std::vector<double> t = ffprobe_frame_times(clip);
#pragma once

#include <filesystem>
#include <optional>
#include <string>
#include <vector>

#include <gtest/gtest.h>

namespace clipwarden::test {

// A new empty folder under the system temp dir, deleted with its contents
// when the object goes out of scope. Set CLIPWARDEN_KEEP_TEMP=1 to keep it.
class TempDir {
 public:
  TempDir();
  ~TempDir();
  TempDir(const TempDir&) = delete;
  TempDir& operator=(const TempDir&) = delete;
  const std::filesystem::path& path() const { return path_; }
  // path() / name, as a string.
  std::string file(const std::string& name) const { return (path_ / name).string(); }

 private:
  std::filesystem::path path_;
};

struct CommandResult {
  int exit_code = -1;  // -1 when the program could not be started or was killed
  std::string out;     // captured stdout
  std::string err;     // captured stderr
};

// Runs a program (looked up on PATH, no shell) and waits for it.
CommandResult run_command(const std::vector<std::string>& argv);

// True when `name` is an executable on PATH (e.g. "ffmpeg", "ffprobe").
bool have_tool(const std::string& name);

// Skips the current test with a clear message when a tool is missing.
#define CLIPWARDEN_SKIP_WITHOUT_TOOL(name)                                                   \
  do {                                                                                      \
    if (!::clipwarden::test::have_tool(name)) GTEST_SKIP() << (name) << " is not installed"; \
  } while (0)

// Writes `out` with ffmpeg from one lavfi source (e.g.
// "testsrc2=size=160x120:rate=24:duration=2", "mandelbrot=...",
// "sine=frequency=440:duration=3"). `extra` goes between the input and the
// output name (codecs, filters, more "-f lavfi -i" inputs may go before:
// use `inputs_before` for those). Returns "" on success, else ffmpeg's
// stderr.
std::string make_lavfi_clip(const std::string& out, const std::string& source,
                            const std::vector<std::string>& extra = {},
                            const std::vector<std::string>& inputs_before = {});

// Per-frame times of the first video stream as ffprobe reports them.
// entry: "best_effort_timestamp_time" (default) or "pts_time". A frame
// without a value (ffprobe's "N/A", e.g. a frame flushed from a decoder
// with delay) is NaN. Empty when ffprobe fails.
std::vector<double> ffprobe_frame_times(const std::string& clip,
                                        const std::string& entry = "best_effort_timestamp_time");

// One value ffprobe reports for the first video stream or the container,
// e.g. ffprobe_value(clip, "stream=codec_name"), ffprobe_value(clip,
// "format=format_name"), ffprobe_value(clip, "stream=nb_read_frames",
// {"-count_frames"}). "" when ffprobe fails or has no such entry.
std::string ffprobe_value(const std::string& clip, const std::string& entry,
                          const std::vector<std::string>& extra = {});

// One value per frame that an FFmpeg filter writes as frame metadata, e.g.
// ffmpeg_frame_metadata(clip, "signalstats", "lavfi.signalstats.YAVG").
// The filter runs on the decoded frames in the stream's own pixel format.
std::vector<double> ffmpeg_frame_metadata(const std::string& clip, const std::string& filter,
                                          const std::string& key);

// Path of a file in opencv-doc's sample data
// (/usr/share/doc/opencv-doc/examples/data/NAME), or nothing when it is not
// installed. Use with CLIPWARDEN_SKIP_WITHOUT_DATA.
std::optional<std::string> opencv_data(const std::string& name);

#define CLIPWARDEN_SKIP_WITHOUT_DATA(var, name)                                             \
  const std::optional<std::string> var##_found = ::clipwarden::test::opencv_data(name);     \
  if (!var##_found) GTEST_SKIP() << "opencv-doc sample " << (name) << " is not installed"; \
  const std::string var = *var##_found

}  // namespace clipwarden::test
