// Plain words behind verdict reasons (analyzer/policy/plain_words.h): the
// place names of a grid cell and the durations, worked by hand.
#include <gtest/gtest.h>

#include "analyzer/policy/plain_words.h"

using namespace clipwarden;

TEST(PlainWords, GridPlaces) {
  // An 8 x 6 grid: thirds are cols 0-2 / 3-5 / 6-7 and rows 0-1 / 2-3 / 4-5.
  EXPECT_EQ(grid_place(5, 0, 6, 8), "the lower left");
  EXPECT_EQ(grid_place(0, 7, 6, 8), "the upper right");
  EXPECT_EQ(grid_place(2, 3, 6, 8), "the centre");
  EXPECT_EQ(grid_place(3, 0, 6, 8), "the middle left");
  EXPECT_EQ(grid_place(0, 4, 6, 8), "the upper middle");
}

TEST(PlainWords, FreezeSaysHowLongThePictureStandsStill) {
  Report r;
  for (int i = 0; i < 20; ++i) r.frame_times_s.push_back(i * 0.1);
  // Frames 5-9 and the interval after frame 9: 0.5 s.
  EXPECT_EQ(plain_words(r, "freeze", 5, 9, 1), "the picture stands still for 0.5 s");
  EXPECT_EQ(plain_words(r, "cut", 5, 5, 3), "the picture jumps to a different view 3 times");
  EXPECT_EQ(plain_words(r, "unknown_metric", 5, 9, 1), "");
}

TEST(PlainWords, LocalPulseNamesWhereAndHowOften) {
  Report r;
  for (int i = 0; i < 40; ++i) r.frame_times_s.push_back(i / 10.0);
  r.summary.details["flicker_local"] = {{"grid", {8, 6}},
                                        {"blocks", {{{"row", 5}, {"col", 1}, {"pulses", 4}}}}};
  EXPECT_EQ(plain_words(r, "flicker_local", 10, 21, 1),
            "a region at the lower left brightens and darkens 4 times in 1.2 s");
}
