// jolt on real hand-held footage where no camera homography fits: opencv-doc's
// cup.mp4 (a glossy tumbler turned in the hand fills most of the view; at
// 320 px its pairs around frame 50 have no camera fit). FFmpeg's crop, pad
// and overlay filters, not our injector, displace frame 50 by 20 px at
// 640x480 (10 px at the 320 px analysis size, diagonal 400 px): jolt must
// read 2 * 10 / 400 = 0.05 there (jerk_metric.cpp, picture_acceleration.h)
// and review, and nowhere else. Measured 2026-12-05: 0.0494 at frame 50;
// the binary before the picture's own acceleration left frames 49-51
// undefined and found nothing.
#include <gtest/gtest.h>

#include <cstdlib>
#include <string>

#include "clipwarden/analysis.h"
#include "clipwarden/policy.h"
#include "support/clips.h"
#include "support/corpus.h"
#include "support/opencv_doc.h"

namespace clipwarden::test {
namespace {

TEST(JoltFootage, ADisplacedFrameOfTheHandHeldCupReviews) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  const TempDir dir;
  const std::string cup = unpacked_opencv_doc_clip(dir.path().string(), "cup.mp4");
  if (cup.empty()) GTEST_SKIP() << "opencv-doc cup.mp4.gz (or gzip) not installed";
  const std::string displaced = dir.file("displaced.mkv");
  const std::string command =
      "ffmpeg -v error -y -i '" + cup +
      "' -filter_complex \"[0:v]trim=end_frame=100,setpts=PTS-STARTPTS,split[a][b];"
      "[b]crop=iw-20:ih:0:0,pad=iw+20:ih:20:0[s];[a][s]overlay=enable='eq(n,50)'[out]\" "
      "-map '[out]' -c:v ffv1 '" + displaced + "'";
  ASSERT_EQ(std::system(command.c_str()), 0) << command;

  AnalysisSettings settings;
  settings.working_long_side = 320;
  const auto report = analyze_clip(displaced, settings, default_policy());
  ASSERT_TRUE(report) << report.error().message();
  const MetricSeries* jolt = report->find_series("jolt");
  ASSERT_NE(jolt, nullptr);
  ASSERT_GT(jolt->values.size(), 51u);
  EXPECT_NEAR(jolt->values[50], 0.05, 0.1 * 0.05) << "measured 0.0494";
  EXPECT_EQ(flagged_segments(*report, "jolt"), "frames 50-51 peak " + std::to_string(jolt->values[50]));
}

}  // namespace
}  // namespace clipwarden::test
