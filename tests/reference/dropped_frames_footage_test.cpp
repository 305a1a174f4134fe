// The dropped-frames review on real files. Outside anchors: opencv-doc
// tree.avi, a capture at about 2.3 fps with irregular timestamps (intervals
// of 5 to 11 ticks of 1/15 s), and camera files of the evaluation corpus
// (CLIPWARDEN_CORPUS; skipped without it) - a webcam WebM whose frames come
// 32 ms apart with a 48 ms interval every twelfth frame, and a still-camera
// MP4 whose timestamps jump 0.2 s once while the picture goes on as before -
// in which no picture is lost, so none may be reviewed for dropped frames;
// and opencv-doc vtest.avi with four frames removed by FFmpeg's select
// filter, their timestamps kept (an evenly timed clip with a real gap),
// which must be.
#include <gtest/gtest.h>

#include <string>

#include "support/clips.h"
#include "support/corpus.h"
#include "support/drift_pairs.h"

namespace clipwarden::test {
namespace {

bool reviews_dropped_frames(const Report& r) {
  for (const std::string& reason : r.verdict.reasons)
    if (reason.find("stream dropped_frames") != std::string::npos) return true;
  return false;
}

TEST(DroppedFramesFootage, IrregularCaptureTimingIsNotDroppedFrames) {
  const std::string tree = opencv_sample("tree.avi");
  if (tree.empty()) GTEST_SKIP() << "opencv-doc tree.avi not installed";
  const Report r = analyse_with_defaults(tree);
  EXPECT_TRUE(r.summary.stream.vfr);
  EXPECT_FALSE(reviews_dropped_frames(r)) << "dropped_frames " << r.summary.stream.dropped_frames;
}

TEST(DroppedFramesFootage, CameraTimingWithoutLostPicturesIsNotDroppedFrames) {
  for (const std::string name : {"cam_imageio_test.webm", "cam_mmaction2_demo_skeleton.mp4"}) {
    const std::string path = corpus_clip(name);
    if (path.empty()) GTEST_SKIP() << "evaluation corpus not found (set CLIPWARDEN_CORPUS)";
    const Report r = analyse_with_defaults(path);
    EXPECT_FALSE(reviews_dropped_frames(r)) << name;
  }
}

TEST(DroppedFramesFootage, FramesRemovedFromAnEvenlyTimedClipAreFound) {
  const std::string vtest = opencv_sample("vtest.avi");
  if (vtest.empty()) GTEST_SKIP() << "opencv-doc vtest.avi not installed";
  CLIPWARDEN_SKIP_WITHOUT_TOOL("ffmpeg");
  TempDir dir;
  const std::string clip = dir.file("gap.mkv");
  // Frames 20-23 of the first 40 removed; the rest keep their times.
  const auto made = run_command({"ffmpeg", "-nostdin", "-v", "error", "-y", "-i", vtest,
                                 "-frames:v", "40", "-vf", "select='not(between(n\\,20\\,23))'",
                                 "-fps_mode", "passthrough", "-c:v", "ffv1", clip});
  ASSERT_EQ(made.exit_code, 0) << made.err;
  const Report r = analyse_with_defaults(clip);
  EXPECT_EQ(r.summary.stream.dropped_frames, 4);
  bool found = false;
  for (const std::string& reason : r.verdict.reasons)
    if (reason.find("stream dropped_frames 4 >= review 3 (frame 20,") != std::string::npos)
      found = true;
  EXPECT_TRUE(found) << "no dropped-frames review at frame 20";
}

}  // namespace
}  // namespace clipwarden::test
