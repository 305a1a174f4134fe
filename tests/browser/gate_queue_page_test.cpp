// The review-queue page (analyzer/gate/queue_page.cpp) loaded in headless
// Chromium (Debian's chromium package, driven by tests/browser/page_check.py):
// the browser itself reports that the Content-Security-Policy lets the page's
// style apply (no violation), that nothing is requested from the network and
// that hostile clip names and metadata stay text.
#include <gtest/gtest.h>

#include <filesystem>

#include "analyzer/gate/queue_page.h"
#include "support/clips.h"
#include "support/gate_files.h"

using namespace clipwarden;
using namespace clipwarden::test;

namespace {

ClipResult result(int index, std::optional<Verdict> verdict, const std::string& id,
                  double coherence) {
  ClipResult r;
  r.input.index = index;
  r.input.id = id;
  r.input.path = "clips/" + id;
  r.verdict = verdict;
  r.coherence = coherence;
  if (verdict) r.report = "clip_" + std::to_string(index) + ".json";
  return r;
}

}  // namespace

TEST(GateQueuePage, LoadsCleanlyInChromiumWithHostileInputs) {
  if (!std::filesystem::exists("/usr/bin/chromium")) GTEST_SKIP() << "chromium is not installed";
  if (!std::filesystem::exists("/usr/bin/python3"))
    GTEST_SKIP() << "/usr/bin/python3 is not installed";
  std::vector<ClipResult> results = {
      result(0, Verdict::pass, "harbour dawn.mp4", 98),
      result(1, Verdict::reject, "<img src=x onerror=alert(1)>.mp4", 31),
      result(2, std::nullopt, "<script>alert('q')</script>", kUndefined),
      result(3, Verdict::review, "été — 街.mp4", 64),
  };
  results[1].reasons = {"flicker p95 0.041 >= reject 0.03 (frames 12-40, 0.50-1.67 s)",
                        "</li><script>alert(2)</script>"};
  results[1].input.model = "\" onmouseover=\"alert(3)";
  results[1].input.prompt_id = "<b>p</b>";
  results[2].error = input_error(results[2].input.path, "not a video file FFmpeg can read");
  std::vector<std::string> links = {"clip_0.json", "clip_1.json", "", "clip 3 été.json"};
  TempDir dir;
  write_text(dir.path() / "index.html", render_queue_page(results, links));

  const auto run = run_command({"/usr/bin/python3",
                                std::string(CLIPWARDEN_SOURCE_DIR) + "/tests/browser/page_check.py",
                                "/usr/bin/chromium", dir.file("index.html"), dir.file("shot.png")});
  ASSERT_EQ(run.exit_code, 0) << run.err;
  const auto facts = nlohmann::json::parse(run.out);
  EXPECT_TRUE(facts["dom"]["violations"].empty()) << facts.dump();  // the style's hash matches
  EXPECT_TRUE(facts["requests"].empty()) << facts.dump();
  EXPECT_TRUE(facts["console_errors"].empty()) << facts.dump();
  EXPECT_TRUE(facts["log_errors"].empty()) << facts.dump();
  EXPECT_TRUE(facts["exceptions"].empty()) << facts.dump();
  EXPECT_TRUE(facts["dom"]["alerts"].empty()) << facts.dump();
  EXPECT_EQ(facts["dom"]["scripts"], 0) << facts.dump();
  EXPECT_EQ(facts["dom"]["elements_with_onerror"], 0) << facts.dump();
  EXPECT_EQ(facts["dom"]["images"], 0) << facts.dump();
  EXPECT_EQ(facts["dom"]["h1"], "Review queue");
  EXPECT_NE(facts["dom"]["title"].get<std::string>().find("4 clips"), std::string::npos);
}
