// The area rule of WCAG 2.x "general flash and red flash thresholds":
// content passes if "the combined area of flashes occurring concurrently
// occupies no more than a total of .006 steradians within any 10 degree
// visual field on the screen (25% of any 10 degree visual field on the
// screen)", with the note that "a 341 x 256 pixel rectangle anywhere on the
// displayed screen area when the content is viewed at 1024 x 768 pixels will
// provide a good estimate of a 10 degree visual field".
#pragma once

#include <opencv2/core.hpp>

namespace clipwarden::flash {

// The share of a 10-degree field that flashing may cover without failing.
inline constexpr double kAreaFraction = 0.25;

// The reference screen and field of the WCAG note, in pixels.
inline constexpr double kScreenWidth_px = 1024, kScreenHeight_px = 768;
inline constexpr double kFieldWidth_px = 341, kFieldHeight_px = 256;

// The 10-degree field in cells of a grid covering the whole frame. The clip
// is taken to fill the 1024x768 screen, each axis scaled on its own, so the
// field is a third of the frame each way whatever the aspect ratio (for a
// wide clip this is smaller, so stricter, than letterboxing it).
cv::Size ten_degree_field(cv::Size grid);

struct AreaResult {
  int flashes = 0;  // largest n meeting the area rule; 0 if none
  cv::Rect field;   // where (grid cells): a field position where it is met
};

// flash_counts: CV_32SC1 per-cell flash counts over a one-second window.
// Returns the largest n >= 1 such that, in some position of `field`, the
// cells with at least n flashes cover more than kAreaFraction of it.
AreaResult max_flashes_over_area(const cv::Mat& flash_counts, cv::Size field);

// Concurrency: same_way01 (CV_8UC1, 0/1) marks cells that changed one way
// at the same time, other_way01 those that changed the other way. Returns a
// 0/1 mask of the same-way cells that lie in some position of `field` where
// the same-way cells outnumber the other-way ones by more than
// kAreaFraction of the field (a flash moves an area one way; texture
// passing by moves as much up as down).
cv::Mat cells_in_dense_fields(const cv::Mat& same_way01, const cv::Mat& other_way01,
                              cv::Size field);

}  // namespace clipwarden::flash
