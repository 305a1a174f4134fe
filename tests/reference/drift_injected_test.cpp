// Drift on real images moved by known motions (opencv-doc baboon.jpg as the
// scene, a crop of fruits.jpg as the moving object), with known changes
// injected. Outside sources: the photographs (real texture and colour
// statistics), OpenCV's DIS optical flow for the pairs, and CIEDE2000
// (Sharma et al. 2005, checked in tests/unit/color_ciede2000_test.cpp) for
// the injected colour difference.
#include <gtest/gtest.h>

#include <cmath>
#include <iostream>

#include <opencv2/imgproc.hpp>

#include "framelint/analysis.h"
#include "support/drift_pairs.h"
#include "support/drift_scenes.h"

namespace framelint {
std::unique_ptr<Metric> make_drift_metric(const AnalysisSettings& settings);
}

namespace framelint::test {
namespace {

struct Fixture {
  DriftScene scene;
  bool ok = false;
};

Fixture base_scene() {
  Fixture f;
  cv::Mat bg = load_sample_image("baboon.jpg");
  cv::Mat fruits = load_sample_image("fruits.jpg");
  if (bg.empty() || fruits.empty()) return f;
  cv::resize(bg, f.scene.background, cv::Size(), 1.25, 1.25, cv::INTER_AREA);
  f.scene.patch = fruits(cv::Rect(150, 120, 80, 72)).clone();
  f.ok = true;
  return f;
}

Report run(const DriftScene& scene, double fps) {
  AnalysisSettings settings;
  auto metric = make_drift_metric(settings);
  return run_metric_on_frames(*metric, render_scene(scene), fps);
}

void dump(const Report& r) {
  for (const auto& o : r.objects) {
    std::cout << "object " << o.id << " " << o.detail["kind"] << " " << o.first_frame << "-"
              << o.last_frame << " " << o.end_reason << " peak " << o.detail["peak_drift"]
              << " segs " << o.detail["drift_segments"] << "\n   col " << o.detail["color_de00"]
              << "\n   str " << o.detail["structure"] << "\n   size " << o.detail["size_pct"]
              << "\n   vis " << o.detail["visible_pct"] << "\n   box " << o.detail["boxes"][0]
              << "\n";
  }
}

TEST(DriftInjected, HueRampOnMovingPatch) {
  Fixture f = base_scene();
  if (!f.ok) GTEST_SKIP() << "opencv-doc baboon.jpg / fruits.jpg not installed";
  f.scene.patch_state = [](int frame) {
    PatchState s;
    s.hue_deg = 40.0 * ramp(frame, 12, 36);
    return s;
  };
  const Report r = run(f.scene, 12);
  dump(r);
  std::cout << "expected " << mean_colour_de00(f.scene.patch, rotate_hue(f.scene.patch, 40)) << "\n";
}

TEST(DriftInjected, CleanMovingPatch) {
  Fixture f = base_scene();
  if (!f.ok) GTEST_SKIP() << "opencv-doc baboon.jpg / fruits.jpg not installed";
  const Report r = run(f.scene, 12);
  dump(r);
}

TEST(DriftInjected, FadeOutInsideFrame) {
  Fixture f = base_scene();
  if (!f.ok) GTEST_SKIP() << "opencv-doc baboon.jpg / fruits.jpg not installed";
  f.scene.patch_state = [](int frame) {
    PatchState s;
    s.alpha = 1.0 - ramp(frame, 15, 30);
    return s;
  };
  const Report r = run(f.scene, 12);
  dump(r);
}

}  // namespace
}  // namespace framelint::test
