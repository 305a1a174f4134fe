// What the gate's tests need beyond support/clips.h: small text files and a
// clipwarden child started in the background (to be killed mid-batch).
#pragma once

#include <filesystem>
#include <string>
#include <vector>

namespace clipwarden::test {

// Writes `text` to `path`, creating parent folders.
void write_text(const std::filesystem::path& path, const std::string& text);
std::string read_text(const std::filesystem::path& path);
// Non-empty lines of a text file, without the newline.
std::vector<std::string> read_lines(const std::filesystem::path& path);

// Starts a program (no shell) without waiting; its stdout and stderr go to
// `log_dir`/stdout and `log_dir`/stderr. Returns the child's pid, or -1.
int start_program(const std::vector<std::string>& argv, const std::filesystem::path& log_dir);

// Waits for a child started by start_program; its exit status, or -1 when
// it did not exit normally (e.g. killed by a signal).
int wait_program(int pid);

// Makes `n` small different clips (FFmpeg's testsrc2 at 160x120, 12 fps,
// 1 s, each with its own hue) named <stem>_<i>.mp4 in `dir`. Returns "" on
// success, else ffmpeg's complaint.
std::string make_varied_clips(const std::filesystem::path& dir, int n,
                              const std::string& stem = "clip");

}  // namespace clipwarden::test
