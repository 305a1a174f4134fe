// Bad-input corpus: broken and unusual clips, made at run time
// from FFmpeg's lavfi test sources and byte surgery (never committed), each
// given to the built `clipwarden analyze` with a time limit. Every case must
// end in either a schema-valid report (exit 0/1) or a one-line error naming
// the input (exit 3): never a signal, never a hang, and never a report that
// is wrong about what the file holds (a truncated clip may not claim the
// full clip's frames; identical frames must show as a freeze). Then
// `clipwarden gate` runs over the whole corpus folder: every clip gets a
// queue row, none is lost. The table of outcomes is printed for the record.
#include <gtest/gtest.h>
#include <unistd.h>

#include <filesystem>
#include <functional>
#include <iostream>
#include <map>
#include <set>

#include "analyzer/core/byte_text.h"
#include "clipwarden/report_io.h"
#include "support/bad_corpus.h"
#include "support/clips.h"
#include "support/gate_files.h"
#include "support/robust_run.h"

using namespace clipwarden;
using namespace clipwarden::test;
namespace fs = std::filesystem;
using nlohmann::json;

namespace {

constexpr double kLimitPerClipS = 60;
// The cases differ in containers, codecs, timestamps and damaged bytes, not in
// what the analysis sees; analysing them at 160 px instead of the default
// 512 px keeps every decode and error path and takes a fifth of the time
// (which matters under the sanitizers: 373 s at 512 px in the ASan build).
constexpr const char* kAnalysisWidth = "160";

// A report that exists and validates, or the reason it does not.
std::string load_report(const fs::path& out_dir, json& report) {
  std::vector<fs::path> found;
  for (const auto& e : fs::directory_iterator(out_dir)) {
    const std::string name = e.path().filename().string();
    if (name.rfind(".tmp-", 0) == 0) return "temporary file left behind: " + name;
    if (e.path().extension() == ".json") found.push_back(e.path());
  }
  if (found.size() != 1) return "expected one JSON report, found " + std::to_string(found.size());
  report = json::parse(read_text(found[0]), nullptr, false);
  if (report.is_discarded()) return "the report is not JSON";
  if (auto st = validate_report_json(report, found[0].string()); !st) return st.error().message();
  fs::path html = found[0];
  html.replace_extension(".html");
  if (!fs::exists(html)) return "no HTML page beside the report";
  return "";
}

// "" when a one-line error names the input.
std::string check_error_line(const std::string& err, const std::string& input) {
  std::string text = err;
  while (!text.empty() && text.back() == '\n') text.pop_back();
  if (text.empty()) return "exit 3 without an error message";
  if (text.find('\n') != std::string::npos) return "error is more than one line: " + text;
  const std::string name = fs::path(input).filename().string();
  if (text.find(name.empty() ? input : name) == std::string::npos)
    return "error does not name the input: " + text;
  return "";
}

class BadInputCorpus : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    if (!have_tool("ffmpeg")) return;
    dir_ = new TempDir();
    corpus_ = new BadCorpus(make_bad_corpus(dir_->path() / "corpus"));
  }
  static void TearDownTestSuite() {
    delete corpus_;
    delete dir_;
    corpus_ = nullptr;
    dir_ = nullptr;
  }
  void SetUp() override {
    if (!corpus_) GTEST_SKIP() << "ffmpeg is not installed";
    ASSERT_TRUE(corpus_->problems.empty()) << corpus_->problems;
  }
  static TempDir* dir_;
  static BadCorpus* corpus_;
};
TempDir* BadInputCorpus::dir_ = nullptr;
BadCorpus* BadInputCorpus::corpus_ = nullptr;

TEST_F(BadInputCorpus, AnalyzeEndsInReportOrClearErrorForEveryCase) {
  std::map<std::string, int> tally;
  std::string table;
  for (const auto& c : corpus_->cases) {
    const fs::path out = dir_->path() / "analyze" / c.name;
    const auto run = run_bounded(
        {CLIPWARDEN_BINARY, "analyze", c.path, "--out", out.string(), "--threads", "1", "--width",
         kAnalysisWidth, "--quiet"},
        dir_->path() / "logs" / c.name, kLimitPerClipS);
    std::string outcome = run.outcome(), problem;
    if (run.timed_out || run.signal != 0) {
      problem = "must end by itself without a signal; stderr: " + run.err;
    } else if (run.exit_code == 0 || run.exit_code == 1) {
      outcome = "report (exit " + std::to_string(run.exit_code) + ")";
      json report;
      problem = load_report(out, report);
      if (problem.empty() && c.expect == Expect::error)
        problem = "a report for an input that holds no usable video";
      if (problem.empty() && c.check_report) problem = c.check_report(report);
      if (problem.empty() && c.note_report) outcome += " " + c.note_report(report);
    } else if (run.exit_code == 3) {
      outcome = "error (exit 3)";
      problem = check_error_line(run.err, c.path);
      if (problem.empty() && c.expect == Expect::report)
        problem = "a well-formed clip was refused: " + run.err;
    } else {
      problem = "unexpected exit status; stderr: " + run.err;
    }
    ++tally[problem.empty() ? outcome.substr(0, outcome.find(' ')) : "FAILED"];
    table += "  " + c.name + " -> " + outcome + (problem.empty() ? "" : "  FAILED: " + problem) +
             (c.note.empty() ? "" : "  [" + c.note + "]") + "\n";
    EXPECT_TRUE(problem.empty()) << c.name << " (" << c.path << "): " << outcome << ": " << problem;
  }
  std::cout << "bad-input corpus, clipwarden analyze (" << corpus_->cases.size() << " cases):\n"
            << table;
  for (const auto& [k, n] : tally) std::cout << "  " << k << ": " << n << "\n";
}

TEST_F(BadInputCorpus, GateOverTheWholeFolderGivesEveryClipARow) {
  const fs::path out = dir_->path() / "gate";
  std::vector<std::string> argv = {CLIPWARDEN_BINARY,
                                   "gate",
                                   corpus_->folder.string(),
                                   "--out",
                                   out.string(),
                                   "--jobs",
                                   "2",
                                   "--threads",
                                   "1",
                                   "--width",
                                   kAnalysisWidth,
                                   "--quiet"};
  // Inputs a folder scan does not pick up (not video by name) are given
  // by name, as a user would.
  for (const auto& c : corpus_->cases)
    if (!c.found_by_folder_scan) argv.push_back(c.path);
  const auto run = run_bounded(argv, dir_->path() / "logs" / "gate", 10 * kLimitPerClipS);
  ASSERT_FALSE(run.timed_out) << "the gate hung";
  ASSERT_EQ(run.signal, 0) << run.err;
  EXPECT_EQ(run.exit_code, 3) << "some inputs are unreadable, so exit 3; stderr: " << run.err;

  std::map<std::string, int> rows;
  std::map<std::string, int> by_status;
  for (const auto& line : read_lines(out / "queue.jsonl")) {
    const json j = json::parse(line, nullptr, false);
    ASSERT_FALSE(j.is_discarded()) << line;
    const auto bytes = get_bytes_field(j, "path");  // a name need not be UTF-8
    ASSERT_TRUE(bytes) << line;
    const std::string path = fs::path(*bytes).lexically_normal().string();
    ++rows[path];
    const std::string status = j["verdict"].get<std::string>();
    ++by_status[status];
    if (status == "error")
      EXPECT_FALSE(j["error"].get<std::string>().empty()) << line;
    else
      EXPECT_TRUE(fs::exists(out / j["report"].get<std::string>())) << line;
  }
  for (const auto& c : corpus_->cases) {
    const std::string path = fs::path(c.path).lexically_normal().string();
    EXPECT_EQ(rows[path], 1) << c.name << " must have exactly one row (" << path << ")";
  }
  EXPECT_EQ(rows.size(), corpus_->cases.size()) << "rows for inputs that are not in the corpus";
  for (const auto& e : fs::directory_iterator(out))
    EXPECT_NE(e.path().filename().string().rfind(".tmp-", 0), 0u) << e.path();
  EXPECT_TRUE(fs::exists(out / "index.html"));
  std::cout << "gate over the corpus: " << rows.size() << " rows;";
  for (const auto& [k, n] : by_status) std::cout << " " << k << " " << n;
  std::cout << "\n";
}

}  // namespace
