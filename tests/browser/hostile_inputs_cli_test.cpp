// Hostile names through the real CLI into every page: clips named
// like markup, javascript: URLs, an RTL override and a very long name go
// through `clipwarden analyze` (clip pages), a manifest whose id, prompt_id,
// model and free fields are hostile and whose paths hold ../ components goes
// through `clipwarden gate` twice (two model tags: clip pages and the queue's
// index.html) and `clipwarden compare` (compare.html). Every page is loaded
// in headless Chromium by tests/browser/page_check.py, which reports
// dialogs, console errors, CSP violations, requests, event-handler
// attributes, javascript: URLs, and whether the hostile strings are shown
// literally as text. Also: nothing is written outside the output folders,
// whatever the names and ids say.
#include <gtest/gtest.h>

#include <filesystem>
#include <iostream>
#include <map>
#include <set>

#include <nlohmann/json.hpp>

#include "support/clips.h"
#include "support/gate_files.h"

using namespace clipwarden;
using namespace clipwarden::test;
namespace fs = std::filesystem;
using nlohmann::json;

namespace {

const char* const kChromium = "/usr/bin/chromium";
const char* const kPython = "/usr/bin/python3";

// File names cannot hold '/', so the file-name script tag stays open (if it
// were injected it would swallow the rest of the page); a closed one reaches
// the pages as a path: a folder "<script>alert(1)<" holding "script>.mp4".
const std::string kScript = "<script>alert(1)";
const std::string kImg = "\"><img src=x onerror=alert(1)>";
const std::string kJsUrl = "javascript:alert(1)";
const std::string kRtl =
    "\xe2\x80\xae"
    "4pm.exe";  // U+202E RIGHT-TO-LEFT OVERRIDE
const std::string kQuote = "'; alert(1); '";
const std::string kLong = std::string(200, 'W') + "<b>end";
const std::string kLongTail = "<b>end";

// The clip file names (without .mp4) used for `analyze` and the manifest.
std::vector<std::string> hostile_stems() {
  return {kScript, kImg, kJsUrl, kRtl, kQuote, kLong, "<script>alert(1)</script>"};
}

json check_page(const fs::path& page, const fs::path& literals) {
  const auto r =
      run_command({kPython, std::string(CLIPWARDEN_SOURCE_DIR) + "/tests/browser/page_check.py",
                   kChromium, page.string(), page.string() + ".png", literals.string()});
  EXPECT_EQ(r.exit_code, 0) << page << ": " << r.err;
  if (r.exit_code != 0) return json();
  return json::parse(r.out);
}

// The checks every page must pass; `what` names the page in failures.
void expect_inert(const json& f, const std::string& what) {
  ASSERT_TRUE(f.is_object() && f["hostile"].is_object()) << what;
  EXPECT_EQ(f["dom"]["alerts"], json::array()) << what << ": a dialog was opened";
  EXPECT_EQ(f["console_errors"], json::array()) << what << f["console_errors"].dump();
  EXPECT_EQ(f["exceptions"], json::array()) << what << f["exceptions"].dump();
  EXPECT_EQ(f["log_errors"], json::array()) << what << f["log_errors"].dump();
  EXPECT_EQ(f["requests"], json::array()) << what << f["requests"].dump();
  EXPECT_EQ(f["dom"]["violations"], json::array()) << what << f["dom"]["violations"].dump();
  EXPECT_EQ(f["dom"]["non_data_images"], 0) << what << ": an <img> from input";
  EXPECT_EQ(f["hostile"]["handlers"], json::array()) << what << f["hostile"].dump();
  EXPECT_EQ(f["hostile"]["javascript_urls"], json::array()) << what << f["hostile"].dump();
  EXPECT_EQ(f["hostile"]["scripts_calling_alert"], 0) << what;
  EXPECT_EQ(f["hostile"]["iframes"], 0) << what;
  EXPECT_EQ(f["hostile"]["missing_literals"], json::array())
      << what << ": hostile strings not shown as text";
}

// Every file under `root` that is not under one of `allowed` (nor in `before`).
std::vector<std::string> strays(const fs::path& root, const std::set<std::string>& before,
                                const std::vector<fs::path>& allowed) {
  std::vector<std::string> out;
  for (const auto& e : fs::recursive_directory_iterator(root)) {
    if (!e.is_regular_file() || before.count(e.path().string())) continue;
    bool inside = false;
    for (const auto& a : allowed) {
      const auto rel = e.path().lexically_relative(a).string();
      inside = inside || (!rel.empty() && rel.rfind("..", 0) != 0);
    }
    if (!inside) out.push_back(e.path().string());
  }
  return out;
}

class HostileInputs : public ::testing::Test {
 protected:
  void SetUp() override {
    if (!fs::exists(kChromium)) GTEST_SKIP() << kChromium << " is not installed (package chromium)";
    if (!fs::exists(kPython)) GTEST_SKIP() << kPython << " is not installed";
    CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  }
};

}  // namespace

TEST_F(HostileInputs, EveryPageShowsHostileNamesAsTextAndWritesOnlyInsideItsFolder) {
  TempDir dir;
  // Side A: clean clips; side B: the same names with temporal noise, so
  // B loses coherence and the compare page lists the pairs by name.
  std::vector<std::string> clip_paths;
  for (const std::string side : {"A", "B"}) {
    const fs::path clips = dir.path() / "in" / ("clips" + side);
    fs::create_directories(clips);
    const std::string base = (clips / "base.mp4").string();
    std::vector<std::string> codec = {"-c:v", "libx264", "-pix_fmt", "yuv420p"};
    if (side == "B") codec.insert(codec.begin(), {"-vf", "noise=alls=40:allf=t"});
    ASSERT_EQ(make_lavfi_clip(base, "testsrc2=size=160x120:rate=12:duration=1", codec), "");
    for (const auto& stem : hostile_stems()) {
      const fs::path p = clips / (stem + ".mp4");
      fs::create_directories(p.parent_path());
      fs::copy_file(base, p);
      if (side == "A") clip_paths.push_back(p.string());
    }
    fs::remove(base);
  }

  // Two manifests (model tags A and B) with hostile fields; paths reach the
  // clips through ../ components, ids try to climb out of the output folder.
  // B has one more line, with a key A lacks (an unpaired row on the page).
  const std::string kPromptId = "<script>alert(2)</script>";
  const std::string kModel = "\"><img src=x onerror=alert(3)>";
  const std::string kUnpaired = "<svg onload=alert(6)>unpaired";
  for (const std::string side : {"A", "B"}) {
    std::string manifest;
    for (size_t i = 0; i < hostile_stems().size(); ++i) {
      json line = {{"path", "../../in/clips" + side + "/../clips" + side + "/" +
                                hostile_stems()[i] + ".mp4"},
                   {"id", "../../../escape_" + side + std::to_string(i)},
                   {"prompt_id", kPromptId + std::to_string(i)},
                   {"model", kModel + side},
                   {"prompt", "<iframe src=javascript:alert(4)></iframe> " + kRtl},
                   {"seed", 7}};
      manifest += line.dump() + "\n";
    }
    if (side == "B")
      manifest += json{{"path", "../../in/clipsB/" + kJsUrl + ".mp4"},
                       {"id", "../../x.mp4"},
                       {"prompt_id", kUnpaired},
                       {"model", kModel + side}}
                      .dump() +
                  "\n";
    write_text(dir.path() / "m" / side / "manifest.jsonl", manifest);
  }
  std::set<std::string> before;
  for (const auto& e : fs::recursive_directory_iterator(dir.path()))
    if (e.is_regular_file()) before.insert(e.path().string());

  const fs::path analyzed = dir.path() / "out" / "analyze";
  std::vector<std::string> analyze = {CLIPWARDEN_BINARY, "analyze", "--out",  analyzed.string(),
                                      "--threads",      "2",       "--quiet"};
  analyze.insert(analyze.end(), clip_paths.begin(), clip_paths.end());
  const auto a = run_command(analyze);
  ASSERT_TRUE(a.exit_code == 0 || a.exit_code == 1) << a.err;
  std::vector<fs::path> outs = {analyzed};
  // The gate's output folders have hostile names too: the compare page
  // shows them.
  const std::string kFolder = "gate\"><svg onload=alert(5)>";
  for (const std::string side : {"A", "B"}) {
    const fs::path out = dir.path() / "out" / (kFolder + side);
    const auto g = run_command({CLIPWARDEN_BINARY, "gate",
                                (dir.path() / "m" / side / "manifest.jsonl").string(), "--out",
                                out.string(), "--jobs", "2", "--threads", "1", "--quiet"});
    ASSERT_TRUE(g.exit_code == 0 || g.exit_code == 1) << g.err;
    ASSERT_EQ(read_lines(out / "queue.jsonl").size(), hostile_stems().size() + (side == "B"));
    outs.push_back(out);
  }
  const fs::path compared = dir.path() / "out" / "compare";
  const auto c = run_command({CLIPWARDEN_BINARY, "compare", outs[1].string(), outs[2].string(),
                              "--out", compared.string(), "--pair-by", "prompt_id"});
  ASSERT_EQ(c.exit_code, 0) << c.err;
  outs.push_back(compared);
  EXPECT_EQ(strays(dir.path(), before, outs), std::vector<std::string>{})
      << "files written outside the output folders";

  // What each page must show literally.
  std::map<fs::path, std::vector<std::string>> pages;
  for (const auto& e : fs::directory_iterator(analyzed))
    if (e.path().extension() == ".html") pages[e.path()] = {};
  EXPECT_EQ(pages.size(), hostile_stems().size());
  // The gate's clip pages come from the same renderer as analyze's: one is
  // loaded (the browser costs seconds per page), the others are only counted.
  size_t gate_clip_pages = 0;
  for (const auto& out : {outs[1], outs[2]})
    for (const auto& e : fs::directory_iterator(out))
      if (e.path().extension() == ".html" && e.path().filename() != "index.html" &&
          ++gate_clip_pages == 1)
        pages[e.path()] = {};
  EXPECT_EQ(gate_clip_pages, 2 * hostile_stems().size() + 1);
  pages[outs[1] / "index.html"] = {kScript, kImg,      kJsUrl,          kRtl,
                                   kQuote,  kLongTail, kPromptId + "0", kModel + "A"};
  pages[outs[2] / "index.html"] = {kPromptId + "6", kModel + "B", kUnpaired};
  pages[compared / "compare.html"] = {kUnpaired, kFolder + "A", kFolder + "B"};
  ASSERT_TRUE(fs::exists(compared / "compare.html"));

  int checked = 0;
  for (const auto& [page, must_show] : pages) {
    std::vector<std::string> literals = must_show;
    // A clip page names its clip: the stem of the path in its report.
    if (must_show.empty()) {
      fs::path report = page;
      report.replace_extension(".json");
      const json r = json::parse(read_text(report), nullptr, false);
      ASSERT_FALSE(r.is_discarded()) << report;
      const std::string stem = fs::path(r["clip"]["path"].get<std::string>()).stem().string();
      literals.push_back(stem == kLong ? kLongTail : stem);
    }
    write_text(page.string() + ".literals.json", json(literals).dump());
    const json f = check_page(page, page.string() + ".literals.json");
    expect_inert(f, page.string());
    ++checked;
  }
  std::cout << "pages checked in Chromium: " << checked << "\n";
}
