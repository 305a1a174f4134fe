// Each defect lands where and how its truth entry says: a small synthetic
// clip is written losslessly (FFV1), injected, decoded again, and compared
// frame by frame with the clean clip. Lossless coding makes "unchanged"
// mean identical pixels. The expectations come from the defect definitions
// in docs/inject.md; luminance uses IEC 61966-2-1 / BT.709 (relative
// luminance), colour difference CIEDE2000 (Sharma et al. 2005).
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>

#include <opencv2/imgproc.hpp>

#include "clipwarden/inject.h"
#include "support/clips.h"
#include "support/inject_clips.h"

using namespace clipwarden;
namespace ft = clipwarden::test;

namespace {

constexpr int kFrames = 24;
constexpr double kFps = 12;
const cv::Size kSize(96, 64);

class InjectRender : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = temp_.path().string();
    auto clean_path = ft::write_synthetic_clip(dir_ + "/clean.mkv", kSize, kFrames, kFps);
    ASSERT_TRUE(clean_path.ok()) << clean_path.error().message();
    clean_path_ = *clean_path;
    auto clean = ft::read_whole_clip(clean_path_);
    if (!clean) GTEST_SKIP() << "cannot decode our own FFV1 clip: " << clean.error().message();
    clean_ = std::move(*clean);
    ASSERT_EQ(clean_.frames.size(), static_cast<size_t>(kFrames));
  }

  // Injects `specs` losslessly; fills `out_` and returns the truth.
  nlohmann::json inject(const std::vector<std::string>& specs, uint64_t seed = 1) {
    InjectOptions options;
    options.defect_specs = specs;
    options.output_path = dir_ + "/out.mkv";
    options.seed = seed;
    options.writer.codec = VideoCodec::ffv1;
    auto truth = inject_defects(clean_path_, options);
    EXPECT_TRUE(truth.ok()) << truth.error().message();
    if (!truth) return {};
    auto out = ft::read_whole_clip((*truth)["output"]["path"]);
    EXPECT_TRUE(out.ok());
    if (out) out_ = std::move(*out);
    return *truth;
  }

  bool unchanged(int frame) const { return ft::same_pixels(out_.frames[frame].bgr, clean_.frames[frame].bgr); }

  ft::TempDir temp_;
  std::string dir_, clean_path_;
  ft::DecodedClip clean_, out_;
};

// Pixels that differ between two frames, as a mask.
cv::Mat changed_pixels(const cv::Mat& a, const cv::Mat& b) {
  cv::Mat diff;
  cv::absdiff(a, b, diff);
  cv::cvtColor(diff, diff, cv::COLOR_BGR2GRAY);
  return diff > 0;
}

// A truth track entry [frame, x, y, w, h] as whole pixels; the truth rounds
// to 0.1 px, so the box is grown by one pixel on each side.
cv::Rect box_of(const nlohmann::json& entry) {
  const double x = entry[1], y = entry[2], w = entry[3], h = entry[4];
  const int x0 = static_cast<int>(std::floor(x)) - 1, y0 = static_cast<int>(std::floor(y)) - 1;
  return cv::Rect(x0, y0, static_cast<int>(std::ceil(x + w)) + 1 - x0, static_cast<int>(std::ceil(y + h)) + 1 - y0);
}

}  // namespace

TEST_F(InjectRender, FlickerScalesMeanLuminanceOnlyInItsFrames) {
  const auto truth = inject({"flicker@6-13:strength=0.1,hz=3"});
  ASSERT_EQ(out_.frames.size(), clean_.frames.size());
  EXPECT_EQ(truth["defects"][0]["frames"], nlohmann::json({6, 13}));
  for (int i = 0; i < kFrames; ++i) {
    if (i < 6 || i > 13) {
      EXPECT_TRUE(unchanged(i)) << "frame " << i;
      continue;
    }
    // Square wave at 3 Hz sampled at 12 fps: two frames up, two down.
    const double expected = ((i - 6) / 2) % 2 == 0 ? 1.1 : 0.9;
    const double ratio =
        ft::mean_relative_luminance(out_.frames[i].bgr) / ft::mean_relative_luminance(clean_.frames[i].bgr);
    EXPECT_NEAR(ratio, expected, 0.006) << "frame " << i;
  }
}

TEST_F(InjectRender, FreezeRepeatsTheFrameBeforeExactly) {
  const auto truth = inject({"freeze@8-11"});
  ASSERT_EQ(out_.frames.size(), clean_.frames.size());
  EXPECT_EQ(truth["defects"][0]["frames"], nlohmann::json({8, 11}));
  EXPECT_EQ(truth["defects"][0]["strength"], 4);
  for (int i = 0; i < kFrames; ++i) {
    const cv::Mat& expected = clean_.frames[i >= 8 && i <= 11 ? 7 : i].bgr;
    EXPECT_TRUE(ft::same_pixels(out_.frames[i].bgr, expected)) << "frame " << i;
    EXPECT_NEAR(out_.frames[i].t_s, clean_.frames[i].t_s, 1e-3) << "time goes on";
  }
}

TEST_F(InjectRender, DropRemovesFramesAndLeavesAGapInTime) {
  const auto truth = inject({"drop@10-11"});
  ASSERT_EQ(out_.frames.size(), clean_.frames.size() - 2);
  // The gap shows at the first frame after it, output frame 10 (input 12).
  EXPECT_EQ(truth["defects"][0]["frames"], nlohmann::json({10, 10}));
  EXPECT_EQ(truth["output"]["frame_count"], kFrames - 2);
  EXPECT_NEAR(out_.frames[10].t_s - out_.frames[9].t_s, 3 / kFps, 1e-3);
  EXPECT_TRUE(ft::same_pixels(out_.frames[10].bgr, clean_.frames[12].bgr));
  EXPECT_TRUE(ft::same_pixels(out_.frames[9].bgr, clean_.frames[9].bgr));
  EXPECT_GE(out_.stream.dropped_frames, 1) << "the decoder's timing facts see the gap";
}

TEST_F(InjectRender, CutSplicesFramesFromElsewhereInTheClip) {
  const auto truth = inject({"cut@4-7:source_start=16"});
  const auto& entry = truth["defects"][0];
  EXPECT_EQ(entry["frames"], nlohmann::json({4, 7}));
  EXPECT_EQ(entry["details"]["source_start"], 16);
  for (int i = 0; i < kFrames; ++i) {
    const cv::Mat& expected = clean_.frames[i >= 4 && i <= 7 ? 16 + (i - 4) : i].bgr;
    EXPECT_TRUE(ft::same_pixels(out_.frames[i].bgr, expected)) << "frame " << i;
  }
}

TEST_F(InjectRender, CutDefaultSourceLiesTheStrengthInSecondsAway) {
  const auto truth = inject({"cut@3-5:strength=1"});  // 1 s at 12 fps = 12 frames later
  EXPECT_EQ(truth["defects"][0]["details"]["source_start"], 15);
  EXPECT_TRUE(ft::same_pixels(out_.frames[3].bgr, clean_.frames[15].bgr));
}

TEST_F(InjectRender, JerkDisplacesOnlyItsFrame) {
  const auto truth = inject({"jerk@9:strength=0.05,direction=0"});
  const double shift = 0.05 * kSize.width;  // along +x
  EXPECT_EQ(truth["defects"][0]["frames"], nlohmann::json({9, 9}));
  EXPECT_DOUBLE_EQ(truth["defects"][0]["details"]["shift_px"][0], std::round(shift * 10) / 10);
  for (int i = 0; i < kFrames; ++i)
    if (i != 9) EXPECT_TRUE(unchanged(i)) << "frame " << i;
  cv::Mat expected = clean_.frames[9].bgr.clone();
  cv::warpAffine(clean_.frames[9].bgr, expected, cv::Matx23d(1, 0, shift, 0, 1, 0), kSize, cv::INTER_LINEAR,
                 cv::BORDER_REPLICATE);
  EXPECT_TRUE(ft::same_pixels(out_.frames[9].bgr, expected));
}

TEST_F(InjectRender, StrobeFlashesExceedTheWcagThresholds) {
  // WCAG 2.x general flash: a pair of opposing changes in relative
  // luminance of 0.1 or more where the darker state is below 0.8; more than
  // three flashes in any one second is a failure.
  const auto truth = inject({"strobe@0-11:strength=0.2,hz=6"});  // 6 Hz at 12 fps: every other frame
  int flashes = 0;
  for (int i = 1; i < 12; ++i) {
    const double before = ft::mean_relative_luminance(out_.frames[i - 1].bgr);
    const double after = ft::mean_relative_luminance(out_.frames[i].bgr);
    if (after - before >= 0.1 && before < 0.8) ++flashes;
  }
  EXPECT_GE(flashes, 5) << "flashes in the first second";
  EXPECT_GE(truth["defects"][0]["details"]["min_delta_luminance"].get<double>(), 0.199);
  for (int i = 12; i < kFrames; ++i) EXPECT_TRUE(unchanged(i)) << "frame " << i;
}

TEST_F(InjectRender, RegionDefectsStayInsideTheirTrackedRegion) {
  for (const std::string spec : {"local_flicker@4-15:strength=0.4,region=0.3/0.3/0.3/0.4,track=fixed",
                                 "boiling@4-15:strength=20,region=0.3/0.3/0.3/0.4,track=fixed",
                                 "colour_drift@4-15:strength=15,region=0.3/0.3/0.3/0.4",
                                 "shape_drift@4-15:strength=0.4,region=0.3/0.3/0.3/0.4",
                                 "vanish@4-15:strength=1,region=0.3/0.3/0.3/0.4"}) {
    SCOPED_TRACE(spec);
    const auto truth = inject({spec});
    const auto& entry = truth["defects"][0];
    EXPECT_EQ(entry["frames"], nlohmann::json({4, 15}));
    ASSERT_EQ(entry["region_track"].size(), 12u);
    for (int i = 0; i < kFrames; ++i) {
      if (i < 4 || i > 15) {
        EXPECT_TRUE(unchanged(i)) << "frame " << i;
        continue;
      }
      const cv::Mat changed = changed_pixels(out_.frames[i].bgr, clean_.frames[i].bgr);
      cv::Mat outside = changed.clone();
      outside(box_of(entry["region_track"][i - 4]) & cv::Rect(0, 0, kSize.width, kSize.height)).setTo(0);
      EXPECT_EQ(cv::countNonZero(outside), 0) << "frame " << i << " changed outside its truth region";
      if (i == 15) EXPECT_GT(cv::countNonZero(changed), 30) << "frame " << i << " barely changed";
    }
  }
}

TEST_F(InjectRender, TrackedRegionsFollowThePan) {
  // The synthetic scene pans right by 1 px per frame (ft::synthetic_frame).
  const auto truth = inject({"colour_drift@2-21:region=0.5/0.2/0.4/0.5"});
  const auto& track = truth["defects"][0]["region_track"];
  ASSERT_EQ(track.size(), 20u);
  EXPECT_NEAR(track[19][1].get<double>() - track[0][1].get<double>(), 19.0, 2.0);
  EXPECT_NEAR(track[19][2].get<double>() - track[0][2].get<double>(), 0.0, 2.0);
}

TEST_F(InjectRender, ColourDriftGrowsToTheStatedDifference) {
  const auto truth = inject({"colour_drift@4-23:strength=12,region=0.2/0.2/0.4/0.5,track=fixed"});
  // The truth's measured CIEDE2000 at the last frame is the target, up to
  // 8-bit rounding and gamut clipping.
  EXPECT_NEAR(truth["defects"][0]["details"]["de2000_last"].get<double>(), 12, 1.0);
}

TEST_F(InjectRender, SeedsMakeChoicesReproducible) {
  const auto a = inject({"boiling@2-5", "jerk@8"}, 5);
  const cv::Mat first = out_.frames[3].bgr.clone();
  const auto b = inject({"boiling@2-5", "jerk@8"}, 5);
  EXPECT_EQ(a["defects"], b["defects"]);
  EXPECT_TRUE(ft::same_pixels(first, out_.frames[3].bgr));
  const auto c = inject({"boiling@2-5", "jerk@8"}, 6);
  EXPECT_NE(a["defects"][1]["details"], c["defects"][1]["details"]) << "another seed, another jerk direction";
}

TEST_F(InjectRender, BadRangesAndOverlapsAreUsageErrors) {
  InjectOptions options;
  options.output_path = dir_ + "/bad.mkv";
  options.writer.codec = VideoCodec::ffv1;
  options.defect_specs = {"flicker@40-50"};
  auto outside = inject_defects(clean_path_, options);
  ASSERT_FALSE(outside.ok());
  EXPECT_EQ(outside.error().kind, ErrorKind::usage);
  EXPECT_NE(outside.error().message().find("outside the clip"), std::string::npos);
  options.defect_specs = {"freeze@5-9", "flicker@8-12"};
  auto overlap = inject_defects(clean_path_, options);
  ASSERT_FALSE(overlap.ok());
  EXPECT_NE(overlap.error().message().find("overlaps"), std::string::npos);
  options.defect_specs = {"drop@20-"};
  auto drop_at_end = inject_defects(clean_path_, options);
  ASSERT_FALSE(drop_at_end.ok());
  EXPECT_NE(drop_at_end.error().message().find("frame after it"), std::string::npos);
  EXPECT_FALSE(std::filesystem::exists(dir_ + "/bad.mkv")) << "no half-written clip is left";
}
