// Panels of a frame pair. The heat map's numbers must be the warp_error
// metric's own (Lai et al. 2018 eq. 8, as computed by
// analyzer/metrics/image_error.*); the pair is the invented scene of
// tests/support/html_fixtures.* whose motion is known exactly.
#include <gtest/gtest.h>

#include "analyzer/inspect/panels.h"
#include "analyzer/metrics/image_error.h"
#include "support/html_fixtures.h"

using namespace clipwarden;

TEST(Panels, ErrorMapAveragesToTheWarpErrorMetric) {
  fixtures::SyntheticScene scene;
  FramePlanes prev, cur;
  FramePair pair;
  scene.make_pair(100, prev, cur, pair);
  const FramePanels p = make_pair_panels(pair);
  EXPECT_NEAR(p.mean_warp_error,
              masked_squared_rgb_error(cur.bgr, pair.warped_prev_bgr, pair.valid), 1e-6);
  EXPECT_NEAR(p.occluded_pct, 100.0 * (1.0 - pair.valid_fraction), 1e-9);
  for (const cv::Mat* m :
       {&p.previous, &p.current, &p.warped_previous, &p.warp_error_heat, &p.flow_colour})
    EXPECT_EQ(m->size(), cur.bgr.size());
  EXPECT_EQ(p.occlusion_mask.type(), CV_8UC1);
  EXPECT_EQ(cv::countNonZero(p.occlusion_mask), cur.bgr.total() - cv::countNonZero(pair.valid));
  // Motion shown is previous -> current: the background pans left (cyan-blue in
  // the coding), at the scene's pan speed.
  EXPECT_NEAR(
      p.max_flow_px,
      std::hypot(scene.ball_px_per_frame.x, scene.ball_px_per_frame.y) > scene.pan_px_per_frame
          ? std::hypot(scene.ball_px_per_frame.x, scene.ball_px_per_frame.y)
          : scene.pan_px_per_frame,
      1e-5);
  const cv::Vec3b background = p.flow_colour.at<cv::Vec3b>(5, 5);
  EXPECT_EQ(background, cv::Vec3b(255, 209, 0));  // left at full length: RGB (0,209,255)
}

TEST(Panels, ErrorMapSumsSquaredChannelDifferences) {
  cv::Mat a(1, 2, CV_8UC3, cv::Scalar(0, 0, 0)), b(1, 2, CV_8UC3, cv::Scalar(0, 0, 0));
  b.at<cv::Vec3b>(0, 1) = {255, 0, 255};
  const cv::Mat e = warp_error_map(a, b);
  EXPECT_FLOAT_EQ(e.at<float>(0, 0), 0.f);
  EXPECT_FLOAT_EQ(e.at<float>(0, 1), 2.f);  // two channels differ by 1
  const cv::Mat valid = (cv::Mat_<uint8_t>(1, 2) << 255, 0);
  const cv::Mat heat = warp_error_heat_image(e, valid);
  EXPECT_EQ(heat.at<cv::Vec3b>(0, 1)[0],
            heat.at<cv::Vec3b>(0, 1)[2]);  // grey hatching, not the colour scale
}

TEST(Panels, FirstFrameHasOnlyTheCurrentPicture) {
  FramePlanes f;
  f.index = 0;
  f.bgr = cv::Mat(4, 6, CV_8UC3, cv::Scalar(1, 2, 3));
  const FramePanels p = make_first_frame_panels(f);
  EXPECT_FALSE(p.has_previous);
  EXPECT_EQ(p.current.size(), cv::Size(6, 4));
  EXPECT_TRUE(p.flow_colour.empty());
}
