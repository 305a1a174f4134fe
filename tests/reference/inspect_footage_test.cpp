// `inspect` on real footage from Debian's opencv-doc package: vtest.avi, a
// static-camera street scene (768x576, people walking). The panels must all
// be there at the working size, and what they show must agree with the
// footage: the static background has (almost) no motion, so the flow
// picture is mostly white (zero flow is white in the Middlebury coding), and
// warping by the flow brings the previous frame closer to the current one.
#include <gtest/gtest.h>

#include <filesystem>

#include <opencv2/imgcodecs.hpp>

#include "analyzer/metrics/image_error.h"
#include "clipwarden/inspect.h"
#include "support/clips.h"

using namespace clipwarden;

TEST(InspectFootage, VtestFrameHasEveryPanelAtTheWorkingSize) {
  CLIPWARDEN_SKIP_WITHOUT_DATA(clip, "vtest.avi");
  AnalysisSettings settings;  // working long side 512
  auto panels = inspect_frame(clip, 120, settings);
  ASSERT_TRUE(panels.ok()) << panels.error().message();
  ASSERT_TRUE(panels->has_previous);
  const cv::Size size = panels->current.size();
  EXPECT_EQ(std::max(size.width, size.height), 512);
  EXPECT_NEAR(double(size.width) / size.height, 768.0 / 576.0, 0.01);
  for (const cv::Mat* m : {&panels->previous, &panels->warped_previous, &panels->warp_error_heat,
                           &panels->flow_colour, &panels->occlusion_mask})
    EXPECT_EQ(m->size(), size);

  // Static camera: most pixels do not move, and zero flow is white.
  cv::Mat white;
  cv::inRange(panels->flow_colour, cv::Scalar(225, 225, 225), cv::Scalar(255, 255, 255), white);
  EXPECT_GT(cv::countNonZero(white), 0.6 * size.area());
  // The flow explains the walkers: warping lowers the error against the current frame.
  const cv::Mat all(size, CV_8UC1, cv::Scalar(255));
  const double warped = masked_squared_rgb_error(panels->current, panels->warped_previous, all);
  const double unwarped = masked_squared_rgb_error(panels->current, panels->previous, all);
  EXPECT_LT(warped, unwarped);
  EXPECT_GT(panels->max_flow_px, 0.5);  // people do walk

  test::TempDir dir;
  auto paths = write_panel_pngs(*panels, dir.path().string(), "vtest");
  ASSERT_TRUE(paths.ok()) << paths.error().message();
  const std::vector<std::string> kinds = {"previous",
                                          "current",
                                          "warped-prev",
                                          "warp-error-heat",
                                          "warp-error-colour-bar",
                                          "flow-colour",
                                          "flow-colour-wheel",
                                          "occlusion-mask"};
  ASSERT_EQ(paths->size(), kinds.size());
  for (size_t i = 0; i < kinds.size(); ++i) {
    EXPECT_EQ(std::filesystem::path((*paths)[i]).filename().string(),
              "vtest-f000120-" + kinds[i] + ".png");
    const cv::Mat back = cv::imread((*paths)[i], cv::IMREAD_UNCHANGED);
    ASSERT_FALSE(back.empty()) << (*paths)[i];
    if (kinds[i] == "warp-error-colour-bar") {
      EXPECT_EQ(back.cols, std::max(size.width, 480));
    } else if (kinds[i] == "flow-colour-wheel") {
      EXPECT_EQ(back.rows, back.cols);
    } else {
      EXPECT_EQ(back.size(), size) << kinds[i];
    }
  }
  const cv::Mat mask = cv::imread(paths->back(), cv::IMREAD_UNCHANGED);
  EXPECT_EQ(mask.channels(), 1);
  cv::Mat not_binary;
  cv::inRange(mask, cv::Scalar(1), cv::Scalar(254), not_binary);
  EXPECT_EQ(cv::countNonZero(not_binary), 0);
}

TEST(InspectFootage, OutOfRangeFrameSaysHowManyFramesThereAre) {
  CLIPWARDEN_SKIP_WITHOUT_DATA(clip, "tree.avi");  // 68 frames
  auto panels = inspect_frame(clip, 68, AnalysisSettings{});
  ASSERT_FALSE(panels.ok());
  EXPECT_EQ(panels.error().kind, ErrorKind::usage);
  EXPECT_NE(panels.error().message().find("the clip has 68 frames (0 to 67)"), std::string::npos)
      << panels.error().message();
  auto first = inspect_frame(clip, 0, AnalysisSettings{});
  ASSERT_TRUE(first.ok()) << first.error().message();
  EXPECT_FALSE(first->has_previous);
  EXPECT_FALSE(first->current.empty());
}
