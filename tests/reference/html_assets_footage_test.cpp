// The HTML page's pictures from real footage (opencv-doc): the targeted pass
// that decodes a clip again and builds frame pairs only at the segments'
// worst frames must show exactly what the analysis measured there, and a
// page for a ~10 s clip must stay well under 5 MB (the budget).
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <optional>

#include "clipwarden/analysis.h"
#include "clipwarden/html_report.h"
#include "support/clips.h"

using namespace clipwarden;

namespace {

// Adds a segment of `metric` peaking at `frame` (the pictures only need the
// peak frame; the real policy decides segments elsewhere).
void add_segment(Report& r, const std::string& metric, int64_t frame, Severity s) {
  const int64_t a = std::max<int64_t>(0, frame - 2),
                b = std::min<int64_t>(r.frame_times_s.size() - 1, frame + 2);
  r.segments.push_back({metric, a, b, r.frame_times_s[a], r.frame_times_s[b], 1.0, frame, s});
}

// One analysis of Megamind.avi (opencv-doc: an animated trailer, 11.3 s,
// 270 frames, 720x528). ctest runs every test in its own process, so the
// checks that need it share one test.
struct Analysed {
  AnalysisSettings settings;
  std::optional<Report> report;
  std::string error;
};
const Analysed& megamind(const std::string& clip) {
  static const Analysed a = [&] {
    Analysed a;
    a.settings.preset = Preset::fast;
    auto report = analyze_clip(clip, a.settings, default_policy());
    if (report)
      a.report = std::move(report.value());
    else
      a.error = report.error().message();
    return a;
  }();
  return a;
}

void expect_panels_show_what_the_analysis_measured(const std::string& clip) {
  const Analysed& analysed = megamind(clip);
  ASSERT_TRUE(analysed.report) << analysed.error;
  const AnalysisSettings& settings = analysed.settings;
  Report r = *analysed.report;
  r.segments.clear();
  add_segment(r, "warp_error", 40, Severity::reject);
  add_segment(r, "drift", 50, Severity::review);
  TrackedObject o;  // a box followed from frame 10
  o.id = 3;
  o.first_frame = 10;
  o.last_frame = 60;
  for (const auto& [frame, x] : {std::pair{10, 20.0}, std::pair{50, 30.0}}) {
    TrackedSample look;
    look.frame = frame;
    look.box_px = {x, 40, 60, 80};
    o.samples.push_back(look);
  }
  r.objects = {o};

  const HtmlAssets assets = collect_html_assets(r, settings, HtmlOptions{}, {});
  EXPECT_TRUE(assets.notes.empty()) << assets.notes.front();
  ASSERT_EQ(assets.panels.size(), 2u);
  EXPECT_EQ(assets.panels[0].frame_index, 40);  // worst (reject) first
  // The warp error under the picture is the report's own value at that frame.
  const MetricSeries* warp = r.find_series("warp_error");
  ASSERT_NE(warp, nullptr);
  EXPECT_NEAR(assets.panels[0].mean_warp_error, warp->values[40],
              1e-6 * std::max(1.0, warp->values[40]));
  const MetricSeries* occluded = r.find_series("occluded_pct");
  ASSERT_NE(occluded, nullptr);
  EXPECT_NEAR(assets.panels[0].occluded_pct, occluded->values[40], 1e-6);
  // Every picture is there; thumbnails were collected by this pass.
  for (const EncodedImage* image :
       {&assets.panels[0].previous, &assets.panels[0].current, &assets.panels[0].warped_previous,
        &assets.panels[0].warp_error_heat, &assets.panels[0].flow_colour,
        &assets.panels[0].occlusion}) {
    EXPECT_EQ(image->mime, "image/jpeg");
    EXPECT_LE(image->width_px, 320);
  }
  EXPECT_GE(assets.thumbnails.size(), 8u);
  // The drift panel carries the object's first look (frame 10) and its look now.
  ASSERT_EQ(assets.panels[1].objects.size(), 1u);
  EXPECT_EQ(assets.panels[1].objects[0].first_frame, 10);
  EXPECT_FALSE(assets.panels[1].objects[0].first_look.empty());
  EXPECT_FALSE(assets.panels[1].objects[0].current_look.empty());
  EXPECT_FALSE(assets.panels[1].current_with_boxes.empty());
}

void expect_ten_second_page_well_under_five_megabytes(const std::string& clip) {
  const Analysed& analysed = megamind(clip);
  ASSERT_TRUE(analysed.report) << analysed.error;
  Report r = *analysed.report;
  r.segments.clear();
  // More flagged segments than the page pictures (8), spread over the clip.
  for (int64_t f = 15; f < 270; f += 25) add_segment(r, "warp_error", f, Severity::review);
  HtmlOptions options;
  const HtmlAssets assets = collect_html_assets(r, analysed.settings, options, {});
  EXPECT_EQ(assets.panels.size(), size_t(options.max_panel_sets));
  const std::string page = render_clip_page(r, assets, options);
  std::printf("page size for Megamind.avi (%zu frames, %zu segments, %zu panel sets): %zu bytes\n",
              r.frame_times_s.size(), r.segments.size(), assets.panels.size(), page.size());
  EXPECT_LT(page.size(), 2'500'000u);
  std::ofstream("megamind-page.html") << page;  // left in the build tree for a look by hand
}

}  // namespace

TEST(HtmlAssetsFootage, PanelsMatchTheAnalysisAndThePageStaysSmall) {
  CLIPWARDEN_SKIP_WITHOUT_DATA(clip, "Megamind.avi");
  expect_panels_show_what_the_analysis_measured(clip);
  expect_ten_second_page_well_under_five_megabytes(clip);
}
