// The decoder's pool of frames (analyzer/pipeline/planes_pool.h): it counts
// the frames out at once and keeps only a few spare ones, so frames left
// over from a moment that needed many (the cadence filter's hold) are let
// go instead of kept for the rest of the clip. Counts worked by hand.
#include <gtest/gtest.h>

#include "analyzer/pipeline/planes_pool.h"

using namespace clipwarden;

TEST(PlanesPool, CountsFramesOutAndKeepsAFewSpares) {
  auto pool = PlanesPool::create();
  std::vector<std::shared_ptr<FramePlanes>> out;
  for (int i = 0; i < 6; ++i) out.push_back(pool->take());
  out.pop_back();
  out.push_back(pool->take());  // the frame just given back, not a seventh
  EXPECT_EQ(pool->peak_out(), 6u);
  EXPECT_EQ(pool->spares(), 0u);
  out.clear();
  EXPECT_EQ(pool->spares(), PlanesPool::kMaxSpare);
  // A frame taken again is a kept one, with its buffers.
  const uint8_t* buffer = nullptr;
  {
    const auto one = pool->take();
    one->bgr.create(4, 4, CV_8UC3);
    buffer = one->bgr.data;
  }
  EXPECT_EQ(pool->take()->bgr.data, buffer);
  EXPECT_EQ(pool->peak_out(), 6u);
}
