// Light that changes once is not flicker; light that pulses again and again
// is. Outside anchors: opencv-doc vtest.avi (a street seen by a still
// camera, 10 fps) whose brightness FFmpeg's eq filter lifts for three
// frames once, or on four single frames within 1.2 s; and camera clips of the
// evaluation corpus (CLIPWARDEN_CORPUS; skipped without it) whose light
// changes once: a stove's fire leaving the picture as the camera swings to
// a dog, a gym's exposure stepping up and back, a cockatoo's head at the
// lens. A reviewer looking at those frames sees no flicker.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <string>

#include "clipwarden/analysis.h"
#include "support/clips.h"
#include "support/corpus.h"
#include "support/drift_pairs.h"

namespace clipwarden::test {
namespace {

constexpr int kFrames = 50;  // 5 s of vtest.avi at 10 fps

// The first kFrames of vtest.avi with eq's brightness (an offset on Y' in
// [-1, 1]) raised by `lift` on the frames `when` selects, losslessly coded.
Report street_lifted(const std::string& vtest, const std::string& when, double lift) {
  TempDir dir;
  const std::string out = dir.file("street.mkv");
  const std::string eq = "eq=brightness='" + std::to_string(lift) + "*(" + when + ")':eval=frame";
  const auto made =
      run_command({"ffmpeg", "-nostdin", "-v", "error", "-y", "-i", vtest, "-frames:v",
                   std::to_string(kFrames), "-vf", eq, "-c:v", "ffv1", out});
  EXPECT_EQ(made.exit_code, 0) << made.err;
  return analyse_with_defaults(out);
}

const Segment* strongest(const Report& r, const std::string& metric) {
  const Segment* best = nullptr;
  for (const Segment& s : r.segments)
    if (s.metric == metric && (!best || s.peak > best->peak)) best = &s;
  return best;
}

// A lift of 0.025 (about +6 of 255 on Y') reads about 0.066 of the
// street's level at its frames (measured 2026-12-05). Held for 0.3 s once,
// it counts at half (0.033, under the 0.04 where segments start; before
// lone changes counted at half it was a review); on single frames every
// 0.4 s (a minority of each 1 s median window) each lift repeats the
// others and keeps its value: reviews.
TEST(FlickerOnceFootage, ALiftThatComesOnceStaysBelowReviewAndARepeatedOneIsFound) {
  const std::string vtest = opencv_sample("vtest.avi");
  if (vtest.empty()) GTEST_SKIP() << "opencv-doc vtest.avi not installed";
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  const Report once = street_lifted(vtest, "between(n,20,22)", 0.025);
  const Report repeated = street_lifted(vtest, "eq(n,20)+eq(n,24)+eq(n,28)+eq(n,32)", 0.025);
  const Segment* lone = strongest(once, "flicker");
  const Segment* pulses = strongest(repeated, "flicker");
  ASSERT_NE(pulses, nullptr) << "four lifts within 1.2 s were not found";
  EXPECT_NE(pulses->severity, Severity::info) << "peak " << pulses->peak;
  EXPECT_GE(pulses->peak_frame, 20);
  EXPECT_LE(pulses->peak_frame, 32);
  if (lone) EXPECT_EQ(lone->severity, Severity::info) << "peak " << lone->peak;
  // Counted at half, not dropped: the lone lift is still in the series.
  const MetricSeries* series = once.find_series("flicker");
  ASSERT_NE(series, nullptr);
  EXPECT_GT(series->values[21], 0.02);
  EXPECT_LT(series->values[21], 0.04);
  EXPECT_EQ(once.verdict.status, Verdict::pass);
}

// Camera clips whose light changes once: no flicker segment above info.
// Before lone changes counted at half (measured 2026-12-05) they were
// reviewed at 0.094 (frames 9-11), 0.058 (29-37) and 0.082 (157-158).
TEST(FlickerOnceFootage, LightThatChangesOnceInCameraClipsIsNotReviewed) {
  for (const std::string name :
       {"cam_moviepy_fire2.mp4", "cam_mmaction2_test_video_structuralize.mp4",
        "cam_imageio_cockatoo.mp4"}) {
    const std::string path = corpus_clip(name);
    if (path.empty()) GTEST_SKIP() << "evaluation corpus not found (set CLIPWARDEN_CORPUS)";
    EXPECT_EQ(flagged_segments(analyse_with_defaults(path), "flicker"), "") << name;
  }
}

}  // namespace
}  // namespace clipwarden::test
