// The pair builder warps frame t-1 onto t with a precomputed fixed-point map;
// the definition is OpenCV's bilinear cv::remap with the float map
// x + flow_backward(x). These must give the same bytes, whatever the flow.
#include <gtest/gtest.h>

#include <opencv2/imgproc.hpp>

#include "analyzer/flow/occlusion.h"
#include "analyzer/flow/pair_builder.h"

namespace clipwarden {
namespace {

FramePlanes random_planes(cv::RNG& rng, int64_t index) {
  cv::Mat noise(72, 96, CV_8UC3);
  rng.fill(noise, cv::RNG::UNIFORM, 0, 256);
  cv::Mat bgr;
  cv::GaussianBlur(noise, bgr, cv::Size(0, 0), 2.0);  // texture DIS can follow
  FramePlanes planes;
  prepare_planes(index, index / 24.0, bgr, planes);
  return planes;
}

bool same_bytes(const cv::Mat& a, const cv::Mat& b) {
  return a.size() == b.size() && a.type() == b.type() && cv::norm(a, b, cv::NORM_INF) == 0;
}

TEST(PairWarp, FixedPointWarpsEqualRemapWithTheFloatMap) {
  cv::RNG rng(7);
  PairBuilder builder(Preset::balanced);
  for (int trial = 0; trial < 4; ++trial) {
    const FramePlanes prev = random_planes(rng, 0), cur = random_planes(rng, 1);
    FramePair pair;
    builder.build(prev, cur, pair);
    cv::Mat map, bgr, luminance, forward_at_target, valid;
    flow_to_map(pair.flow_backward, map);
    cv::remap(prev.bgr, bgr, map, cv::noArray(), cv::INTER_LINEAR, cv::BORDER_REPLICATE);
    cv::remap(prev.luminance, luminance, map, cv::noArray(), cv::INTER_LINEAR, cv::BORDER_REPLICATE);
    cv::remap(pair.flow_forward, forward_at_target, map, cv::noArray(), cv::INTER_LINEAR,
              cv::BORDER_REPLICATE);
    EXPECT_TRUE(same_bytes(bgr, pair.warped_prev_bgr)) << "trial " << trial;
    EXPECT_TRUE(same_bytes(luminance, pair.warped_prev_luminance)) << "trial " << trial;
    EXPECT_EQ(forward_backward_check(pair.flow_backward, forward_at_target, valid), pair.valid_fraction);
    EXPECT_TRUE(same_bytes(valid, pair.valid)) << "trial " << trial;
  }
}

}  // namespace
}  // namespace clipwarden
