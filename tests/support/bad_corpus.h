// The bad-input corpus: broken and unusual clips made at run
// time (FFmpeg lavfi sources, then byte surgery with fixed seeds), each with
// what a correct checker must do with it.
#pragma once

#include <filesystem>
#include <functional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

namespace clipwarden::test {

enum class Expect {
  report,           // a well-formed clip: a report is required
  report_or_error,  // damaged: either a report that is right, or a clear error
  error,            // holds no usable video: an error is required
};

struct BadCase {
  std::string name;  // short label, also the log folder name
  std::string path;  // the input as given on the command line
  Expect expect = Expect::report_or_error;
  // "" when a report for this input is right, else what is wrong with it.
  std::function<std::string(const nlohmann::json& report)> check_report;
  // Extra words for the outcome table (e.g. the frames reported).
  std::function<std::string(const nlohmann::json& report)> note_report;
  bool found_by_folder_scan = true;  // the gate finds it when given the folder
  std::string note;                  // how the case was made, when not obvious
};

struct BadCorpus {
  std::filesystem::path folder;
  std::vector<BadCase> cases;
  std::string problems;  // what could not be made (the tests fail with it)
};

// Makes every case under `folder`. Needs ffmpeg on PATH.
BadCorpus make_bad_corpus(const std::filesystem::path& folder);

}  // namespace clipwarden::test
