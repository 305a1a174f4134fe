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

// A drift reason names the object, where it is and what changed: the
// stretch that peaked highest within the reason's frames, its aspect, and
// the box of the look nearest its peak (centre (0.8, 0.8): the lower right
// third both ways; 0.2 x 0.3 of the frame: 6%).
TEST(PlainWords, DriftNamesTheObjectItsPlaceAndWhatChanged) {
  Report r;
  for (int i = 0; i < 40; ++i) r.frame_times_s.push_back(i / 10.0);
  TrackedObject quiet, walker;
  quiet.kind = TrackedKind::scene;
  quiet.drift_segments = {{2, 30, 0.2, 3.0, 0.6, 12, "color"}};
  walker.samples.resize(2);
  walker.samples[0].frame = 5;
  walker.samples[0].box_frac = {0.1, 0.1, 0.2, 0.3};
  walker.samples[1].frame = 20;
  walker.samples[1].box_frac = {0.7, 0.65, 0.2, 0.3};
  walker.drift_segments = {{10, 29, 1.0, 2.9, 1.4, 19, "structure"}};
  r.objects = {quiet, walker};
  EXPECT_EQ(plain_words(r, "drift", 10, 29, 1),
            "an object at the lower right (6% of the frame) changes its markings or texture, over 2.0 s");
  // Outside the walker's stretch only the scene cell drifts; it has no
  // looks with a box, so no place is named.
  EXPECT_EQ(plain_words(r, "drift", 2, 8, 1), "the background changes colour, over 0.7 s");
  // Size: the sign of the windowed size change at the look says which way.
  r.objects[1].drift_segments[0].aspect = "size";
  r.objects[1].samples[1].size_window_pct = -31;
  EXPECT_EQ(plain_words(r, "drift", 10, 29, 1),
            "an object at the lower right (6% of the frame) shrinks, over 2.0 s");
  // No followed object (a report written before objects were kept).
  r.objects.clear();
  EXPECT_EQ(plain_words(r, "drift", 10, 29, 1),
            "an object's colour, markings or shape change as it moves, over 2.0 s");
}
