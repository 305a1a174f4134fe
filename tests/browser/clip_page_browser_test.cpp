// The per-clip page in a real browser: headless Chromium (Debian's
// `chromium`, no network: DNS mapped to nothing, background services off)
// loads the page through tests/browser/page_check.py, which drives it over
// the DevTools protocol. Checked: no console error, no uncaught exception,
// no Content-Security-Policy violation, no request other than the page and
// its data: images, no alert(); the DOM has one segment marker per segment
// of the report; hostile input strings come out as text; pressing "n"
// focuses a segment. A screenshot of each page is left in
// <build>/tests/browser-artifacts/ for a look by hand.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>

#include <nlohmann/json.hpp>

#include "clipwarden/html_report.h"
#include "clipwarden/report_io.h"
#include "support/clips.h"
#include "support/html_fixtures.h"

using namespace clipwarden;
using nlohmann::json;

namespace {

const char* const kChromium = "/usr/bin/chromium";
const char* const kPython = "/usr/bin/python3";

std::filesystem::path artifacts() {
  const auto dir = std::filesystem::current_path() / "browser-artifacts";
  std::filesystem::create_directories(dir);
  return dir;
}

// Runs the page checker; fails the test with its message when the browser
// could not be driven.
json check_page(const std::string& page, const std::string& screenshot) {
  const std::string script = std::string(CLIPWARDEN_SOURCE_DIR) + "/tests/browser/page_check.py";
  const auto r = test::run_command({kPython, script, kChromium, page, screenshot});
  EXPECT_EQ(r.exit_code, 0) << r.err;
  if (r.exit_code != 0) return json::object();
  return json::parse(r.out);
}

void expect_clean_load(const json& result) {
  EXPECT_EQ(result["console_errors"], json::array()) << result["console_errors"].dump();
  EXPECT_EQ(result["exceptions"], json::array()) << result["exceptions"].dump();
  EXPECT_EQ(result["log_errors"], json::array()) << result["log_errors"].dump();
  EXPECT_EQ(result["requests"], json::array()) << result["requests"].dump();
  EXPECT_EQ(result["dom"]["violations"], json::array()) << result["dom"]["violations"].dump();
  EXPECT_EQ(result["dom"]["alerts"], json::array());
  EXPECT_EQ(result["dom"]["non_data_images"], 0);
  EXPECT_EQ(result["dom"]["broken_images"], 0);
}

class ClipPageBrowser : public ::testing::Test {
 protected:
  void SetUp() override {
    if (!std::filesystem::exists(kChromium))
      GTEST_SKIP() << kChromium << " is not installed (Debian package chromium)";
    if (!std::filesystem::exists(kPython)) GTEST_SKIP() << kPython << " is not installed";
  }
};

}  // namespace

TEST_F(ClipPageBrowser, FixturePageLoadsCleanlyAndKeepsInputsAsText) {
  fixtures::SyntheticScene scene;
  HtmlOptions options;
  options.facts = {{"prompt", fixtures::kHostilePrompt}};
  const Report report = fixtures::synthetic_report(scene, fixtures::kHostileClipName);
  const HtmlAssets assets = fixtures::synthetic_assets(report, scene, options);
  const std::string page = (artifacts() / "fixture-clip.html").string();
  std::ofstream(page) << render_clip_page(report, assets, options);

  const json result = check_page(page, (artifacts() / "fixture-clip.png").string());
  ASSERT_TRUE(result.contains("dom"));
  expect_clean_load(result);
  const json& dom = result["dom"];
  EXPECT_EQ(dom["markers"], report.segments.size());
  EXPECT_EQ(dom["segment_rows"], report.segments.size());
  EXPECT_EQ(dom["panel_sets"], assets.panels.size());
  // The hostile strings are the visible text, and made no elements.
  EXPECT_EQ(dom["h1"], fixtures::kHostileClipName);
  EXPECT_NE(dom["title"].get<std::string>().find(fixtures::kHostileClipName), std::string::npos);
  EXPECT_NE(dom["facts"].get<std::string>().find(fixtures::kHostilePrompt), std::string::npos);
  EXPECT_EQ(dom["elements_with_onerror"], 0);
  EXPECT_EQ(dom["injected_bold"], 0);
  EXPECT_EQ(dom["scripts"], 2);  // the data block and the page's own script
  EXPECT_NE(dom["caution"].get<std::string>().find("photosensitive epilepsy"), std::string::npos);
  // The page's script ran under its CSP: "n" moved focus to a segment and the readout shows a
  // frame.
  EXPECT_TRUE(result["after_key"]["focused_marker"].get<bool>());
  EXPECT_TRUE(result["after_key"]["cursor_visible"].get<bool>());
  EXPECT_NE(result["after_key"]["readout"].get<std::string>().find("Frame "), std::string::npos);
  EXPECT_GT(std::filesystem::file_size(artifacts() / "fixture-clip.png"), 20'000u);
}

// The checker itself must see a violation when there is one: a page whose
// script no longer matches the hash in its policy is blocked and reported.
TEST_F(ClipPageBrowser, CheckerSeesABlockedScript) {
  fixtures::SyntheticScene scene;
  const Report report = fixtures::synthetic_report(scene, "tampered.mp4");
  std::string html = render_clip_page(report, {}, {});
  const size_t at = html.find("'use strict';");
  ASSERT_NE(at, std::string::npos);
  html.insert(at, " ");
  const std::string page = (artifacts() / "tampered.html").string();
  std::ofstream(page) << html;
  const json result = check_page(page, (artifacts() / "tampered.png").string());
  ASSERT_TRUE(result.contains("dom"));
  EXPECT_FALSE(result["dom"]["violations"].empty());
  EXPECT_FALSE(result["after_key"]["focused_marker"].get<bool>());
}

// A page written by the CLI for real footage (opencv-doc tree.avi, 68
// frames): one marker per segment of the JSON written beside it.
TEST_F(ClipPageBrowser, AnalyzedClipPageMatchesItsJson) {
  CLIPWARDEN_SKIP_WITHOUT_DATA(clip, "tree.avi");
  test::TempDir dir;
  const auto r = test::run_command({CLIPWARDEN_BINARY, "analyze", clip, "--out", dir.path().string(),
                                    "--quiet", "--preset", "fast"});
  ASSERT_TRUE(r.exit_code == 0 || r.exit_code == 1) << r.err;
  const std::string html = dir.file("tree.html");
  ASSERT_TRUE(std::filesystem::exists(html)) << r.out << r.err;
  auto report = read_report_file(dir.file("tree.json"));
  ASSERT_TRUE(report.ok()) << report.error().message();
  std::filesystem::copy_file(html, artifacts() / "tree.html",
                             std::filesystem::copy_options::overwrite_existing);
  const json result = check_page(html, (artifacts() / "tree.png").string());
  ASSERT_TRUE(result.contains("dom"));
  expect_clean_load(result);
  EXPECT_EQ(result["dom"]["markers"], report->segments.size());
  EXPECT_GT(result["dom"]["images"].get<int>(), 0);  // at least the thumbnails
}
