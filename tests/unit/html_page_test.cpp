// The per-clip page as text: self-contained, escaped, one marker per
// segment, bounded size. Its behaviour in a real browser is checked in
// tests/browser/. The report and pictures are the invented fixture of
// tests/support/html_fixtures.* (only the page writer is under test).
#include <gtest/gtest.h>

#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <regex>

#include "clipwarden/html_report.h"
#include "analyzer/inspect/page_pictures.h"
#include "report/html/csp.h"
#include "analyzer/core/object_boxes.h"
#include "support/html_fixtures.h"

using namespace clipwarden;

namespace {

size_t count(const std::string& text, const std::string& needle) {
  size_t n = 0;
  for (size_t at = text.find(needle); at != std::string::npos; at = text.find(needle, at + 1)) ++n;
  return n;
}

std::string between(const std::string& text, const std::string& open, const std::string& close) {
  const size_t a = text.find(open);
  if (a == std::string::npos) return "";
  const size_t b = text.find(close, a + open.size());
  return b == std::string::npos ? "" : text.substr(a + open.size(), b - a - open.size());
}

// Built once: rendering the scene's pairs takes a moment.
struct PageFixture : ::testing::Test {
  struct Shared {
    fixtures::SyntheticScene scene;
    HtmlOptions options;
    Report report;
    HtmlAssets assets;
    std::string html;
  };
  static const Shared& shared() {
    static const Shared s = [] {
      Shared s;
      s.options.facts = {{"prompt", fixtures::kHostilePrompt}};
      s.report =
          fixtures::synthetic_report(s.scene, std::string("clips/") + fixtures::kHostileClipName);
      s.assets = fixtures::synthetic_assets(s.report, s.scene, s.options);
      s.html = render_clip_page(s.report, s.assets, s.options);
      return s;
    }();
    return s;
  }
  const fixtures::SyntheticScene& scene = shared().scene;
  const HtmlOptions& options = shared().options;
  const Report& report = shared().report;
  const HtmlAssets& assets = shared().assets;
  const std::string& html = shared().html;
};

}  // namespace

TEST_F(PageFixture, OneMarkerPerSegmentAndOnePanelSetPerPeakFrame) {
  EXPECT_EQ(count(html, "class=\"seg-marker "), report.segments.size());
  EXPECT_EQ(count(html, "<section class=\"card panel-set\""), 5u);  // five distinct peak frames
  EXPECT_NE(html.find("id=\"frame-127\""), std::string::npos);
  EXPECT_NE(html.find("id=\"seg-4\""), std::string::npos);
}

TEST_F(PageFixture, InputStringsAreEscaped) {
  EXPECT_EQ(html.find("<img src=x"), std::string::npos);
  EXPECT_EQ(html.find("<script>alert"), std::string::npos);
  EXPECT_EQ(html.find("<b>box</b>"), std::string::npos);
  EXPECT_NE(html.find("&lt;img src=x onerror=alert(1)&gt;.mp4"), std::string::npos);
  EXPECT_NE(html.find("A &quot;red&quot; ball &amp; a &lt;b&gt;box&lt;/b&gt;; it&#39;s"),
            std::string::npos);
  EXPECT_EQ(count(html, "<script"), 2u);  // the data block and the page script, nothing else
}

TEST_F(PageFixture, SelfContainedWithAPolicyThatPinsItsOwnStyleAndScript) {
  EXPECT_EQ(html.find("http://"), std::string::npos);
  EXPECT_EQ(html.find("https://"), std::string::npos);
  EXPECT_EQ(html.find("url(http"), std::string::npos);
  const std::string style = between(html, "<style>", "</style>");
  const std::string script = between(html, "<script>", "</script>");
  ASSERT_FALSE(style.empty());
  ASSERT_FALSE(script.empty());
  const std::string policy =
      between(html, "http-equiv=\"Content-Security-Policy\" content=\"", "\"");
  EXPECT_EQ(policy, content_security_policy(style, script));
  EXPECT_EQ(html.find(" style=\""), std::string::npos)
      << "style attributes would need 'unsafe-inline'";
  EXPECT_EQ(count(html, "<style>"), 1u);
}

TEST_F(PageFixture, FlashesBringThePhotosensitiveCaution) {
  EXPECT_NE(html.find("screening aid, not a certification"), std::string::npos);
  EXPECT_NE(html.find("photosensitive epilepsy"), std::string::npos);
  // A calm clip's flash summary still names the limit; that is not a flash.
  Report calm = report;
  calm.summary.details["flash"] = {{"max_flashes_per_s", 0},
                                   {"general_max_flashes_per_s", 0},
                                   {"red_max_flashes_per_s", 0},
                                   {"hazard", false},
                                   {"limit_flashes_per_s", 3}};
  for (auto& v : calm.find_series("flash")->values) v = 0;
  EXPECT_EQ(render_clip_page(calm, assets, options).find("photosensitive epilepsy"),
            std::string::npos);
  calm.find_series("flash")->values[70] = 1;  // one flash in a window: caution, no hazard
  EXPECT_NE(render_clip_page(calm, assets, options).find("photosensitive epilepsy"),
            std::string::npos);
}

TEST_F(PageFixture, TenSecondPageStaysSmall) {
  // 10 s at 30 fps with five panel sets: well under the 5 MB budget.
  EXPECT_LT(html.size(), 1'500'000u) << html.size();
  // For a look by hand; in the temporary folder, never in the source tree.
  std::ofstream(std::filesystem::temp_directory_path() / "clipwarden-html_page_fixture.html") << html;
}

TEST_F(PageFixture, DriftPanelShowsTheObjectsFirstAndCurrentLook) {
  const auto it = std::find_if(assets.panels.begin(), assets.panels.end(),
                               [](const PanelImages& p) { return p.frame_index == 290; });
  ASSERT_NE(it, assets.panels.end());
  ASSERT_EQ(it->objects.size(), 1u);
  EXPECT_FALSE(it->objects[0].first_look.empty());
  EXPECT_FALSE(it->objects[0].current_look.empty());
  EXPECT_FALSE(it->current_with_boxes.empty());
  EXPECT_NE(html.find("Object #1: first look (frame\u00a00)"), std::string::npos);
  // The one free text of an object read from a file is escaped.
  Report odd = report;
  odd.objects.at(0).end_reason = "<ball> & \"co\"";
  EXPECT_NE(render_clip_page(odd, assets, options).find("&lt;ball&gt; &amp; &quot;co&quot;"),
            std::string::npos);
}

TEST_F(PageFixture, PageWithoutPicturesOrSegmentsStillRenders) {
  HtmlAssets none;
  none.notes.push_back("Pictures are missing: clip: gone.");
  const std::string bare = render_clip_page(report, none, options);
  EXPECT_NE(bare.find("No frame pictures in this page: Pictures are missing"), std::string::npos);
  Report empty;
  empty.clip.path = "empty.mp4";
  const std::string minimal = render_clip_page(empty, {}, {});
  EXPECT_NE(minimal.find("No incoherent segments were found."), std::string::npos);
  EXPECT_NE(minimal.find("</html>"), std::string::npos);
}

TEST(PanelFrames, WorstFirstWithoutRepeatsAndCapped) {
  Report r;
  auto seg = [&](int64_t peak, Severity s, int64_t len) {
    r.segments.push_back({"m", peak, peak + len, 0, 0, 1, peak, s});
  };
  seg(10, Severity::info, 50);
  seg(20, Severity::review, 2);
  seg(30, Severity::reject, 1);
  seg(40, Severity::review, 9);
  seg(30, Severity::review, 3);  // same peak frame as the reject one
  HtmlOptions o;
  EXPECT_EQ(panel_frames(r, o), (std::vector<int64_t>{30, 40, 20, 10}));
  o.max_panel_sets = 2;
  EXPECT_EQ(panel_frames(r, o), (std::vector<int64_t>{30, 40}));
}

TEST(ThumbnailCollector, KeepsABoundedEvenlySpacedStrip) {
  ThumbnailCollector thumbs(16, 32);
  const cv::Mat pixels(18, 32, CV_8UC3, cv::Scalar(10, 20, 30));
  for (int i = 0; i < 1000; ++i) thumbs.add({i, i / 25.0, pixels});
  const auto& kept = thumbs.thumbnails();
  EXPECT_LE(kept.size(), 16u);
  EXPECT_GE(kept.size(), 8u);
  for (size_t k = 0; k < kept.size(); ++k)
    EXPECT_EQ(kept[k].frame_index, int64_t(k) * thumbs.interval_frames());
  EXPECT_EQ(kept[0].image.mime, "image/jpeg");
}

TrackedSample sample_at(int64_t frame, BoxValues px, BoxValues frac = {}, double drift = kUndefined) {
  TrackedSample look;
  look.frame = frame;
  look.box_px = px;
  look.box_frac = frac;
  look.drift = drift;
  return look;
}

TEST(ObjectBoxes, PassesOverUnusableBoxes) {
  TrackedObject o;
  o.first_frame = 2;
  o.last_frame = 9;
  o.samples = {sample_at(2, {1, 2, 3, 4}), sample_at(3, {}), sample_at(5, {10, 20, 30, 40}),
             sample_at(6, {0, 0, -1, 4}), sample_at(7, {0, kUndefined, 3, 4})};
  const cv::Size size(100, 50);
  ASSERT_EQ(object_boxes(o, size).size(), 2u);
  EXPECT_EQ(object_box_at(o, 4, size), cv::Rect(1, 2, 3, 4));
  EXPECT_EQ(object_box_at(o, 7, size), cv::Rect(10, 20, 30, 40));
  EXPECT_FALSE(object_box_at(o, 1, size).has_value());
  EXPECT_FALSE(object_box_at(o, 10, size).has_value());
  o.samples.clear();
  EXPECT_TRUE(object_boxes(o, size).empty());
}

// The drift metric's layout (analyzer/drift/drift_report.cpp): sampled
// looks, a box unknown at one of them, fractions of the frame, drift.
TEST(ObjectBoxes, ReadsTheDriftMetricsLayout) {
  TrackedObject o;
  o.first_frame = 10;
  o.last_frame = 40;
  o.samples = {sample_at(10, {5, 5, 10, 10}, {0.1, 0.2, 0.2, 0.4}, 0.0), sample_at(20, {}, {}, kUndefined),
             sample_at(30, {7, 5, 10, 10}, {0.5, 0.2, 0.2, 0.4}, 2.5)};
  // Fractions win: they place the box on a frame of any size.
  EXPECT_EQ(object_box_at(o, 12, {200, 100}), cv::Rect(20, 20, 40, 40));
  EXPECT_EQ(object_box_at(o, 35, {100, 50}), cv::Rect(50, 10, 20, 20));
  EXPECT_EQ(object_drift_at(o, 25), 0.0);
  EXPECT_EQ(object_drift_at(o, 30), 2.5);
  EXPECT_EQ(object_drift_samples(o).size(), 2u);
  for (auto& look : o.samples) look.box_frac = {};
  EXPECT_EQ(object_box_at(o, 35, {200, 100}), cv::Rect(7, 5, 10, 10));
}

TEST(WriteHtmlReport, UnreadableClipStillGetsAPageThatSaysWhy) {
  fixtures::SyntheticScene scene;
  const auto dir =
      std::filesystem::temp_directory_path() / ("clipwarden-html-" + std::to_string(::getpid()));
  std::filesystem::create_directories(dir);
  Report r = fixtures::synthetic_report(scene, (dir / "gone.mp4").string());
  const std::string page = (dir / "gone.html").string();
  ASSERT_TRUE(write_html_report(r, page, AnalysisSettings{}, HtmlOptions{}, nullptr).ok());
  std::ifstream in(page);
  const std::string html((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  EXPECT_NE(html.find("Pictures are missing: "), std::string::npos);
  EXPECT_NE(html.find("gone.mp4"), std::string::npos);
  EXPECT_EQ(count(html, "class=\"seg-marker "), r.segments.size());
  std::filesystem::remove_all(dir);
}
