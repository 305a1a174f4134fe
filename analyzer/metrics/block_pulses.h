// Local flicker: regions whose brightness pulses while the motion does not
// explain it. The frame is cut into a grid of blocks; for each pair, each
// block's motion-compensated luminance change is the median over its
// consistent pixels of Y_t - W(Y_{t-1}) (relative luminance; the median so a
// few misaligned pixels at a moving edge do not count), kept only when at
// least three quarters of those pixels change the same way (a pulse of light
// lifts or lowers a whole region; a mouth opening or a turning object
// changes part of a block), else 0. The change common to
// the whole frame (the median over blocks) is removed, as global flicker is
// the `flicker` metric's business. Each block's changes add up to a level
// (its brightness beyond what motion carries), whose peaks and valleys are
// followed with hysteresis (analyzer/flash/swing_tracker.h): a block that
// swings by at least `min_swing` one way and then at least `min_swing` back
// within `max_pulse_s` pulses, with amplitude the smaller of the two swings.
#pragma once

#include <cstdint>
#include <span>
#include <vector>

#include <opencv2/core.hpp>

#include "analyzer/flash/swing_tracker.h"

namespace clipwarden {

// Block b = row * cols + col. Blocks with fewer than half their pixels valid
// are NaN (unknown this pair). With level_floor > 0 each change is divided
// by the block's mean warped previous luminance (at least level_floor), so
// it is a relative change, as a viewer judges brightness (Weber's law).
std::vector<float> block_luminance_changes(const cv::Mat& cur_luminance,
                                           const cv::Mat& warped_prev_luminance,
                                           const cv::Mat& valid, int cols, int rows,
                                           float level_floor = 0);

// How well each block's texture survived from the warped previous frame:
// the Pearson correlation of the two luminances over the block's valid
// pixels. A change of light scales the texture and keeps its pattern
// (correlation near 1); an occluder passing, a limb smeared by motion blur,
// flames or caustics re-drawing themselves change the pattern. NaN where
// the block has fewer than half its pixels valid or where both sides are
// flat (spread below `min_relative_spread` of the block's mean): a flat
// block has no pattern to judge by.
std::vector<float> block_texture_agreement(const cv::Mat& cur_luminance,
                                           const cv::Mat& warped_prev_luminance,
                                           const cv::Mat& valid, int cols, int rows,
                                           float min_relative_spread);

// What a change of light cannot explain in each block. Light that
// brightens a surface scales it and may add a glow: the change d = cur -
// warped_prev is then a + g * warped_prev over the block (the
// brightness-change model of Negahdaripour, "Revised definition of optical
// flow", IEEE PAMI 20(9), 1998: a gain and an offset beside the motion).
// A bright pattern that travels over the surface - caustics on coral, a
// glint running along a rim - brings a pattern of its own that neither
// term fits. Per block, over its valid pixels: the mean change and the
// spread (standard deviation) of what the least-squares fit a + g * w
// leaves, fitted in each quarter of the block on its own (so the edge of a
// lit region crossing the block is fitted on either side) and pooled, both
// divided by the block's mean warped luminance (at least level_floor) like
// block_luminance_changes. NaN where fewer than half the pixels are valid.
struct LightFit {
  float mean_change = 0;
  float residual_spread = 0;
};
std::vector<LightFit> block_light_fit(const cv::Mat& cur_luminance,
                                      const cv::Mat& warped_prev_luminance, const cv::Mat& valid,
                                      int cols, int rows, float level_floor);

// How far each block's content moves apart from the camera: the mean over
// the block's valid pixels of |flow(x) - camera(x)|, where camera(x) is the
// backward displacement the camera homography gives (prev -> cur, so
// H^-1 x - x), in pixels per frame. NaN where fewer than half the pixels
// are valid.
std::vector<float> block_own_motion(const cv::Mat& flow_backward,
                                    const cv::Matx33d& camera_homography, const cv::Mat& valid,
                                    int cols, int rows);

// Blocks with something moving of its own in their 3 x 3 neighbourhood
// (own motion above `max_motion`): there a passing object, a swinging limb
// or a smooth body the flow cannot hold brings brightness with it, and a
// change of the block's level is not light.
std::vector<bool> blocks_near_movers(const std::vector<float>& own_motion, int cols, int rows,
                                     float max_motion);

// Subtracts the median of the known changes from each (the frame's common
// change); returns that median (0 when nothing is known).
float remove_common_change(std::span<float> changes);

// The level a per-frame amplitude reaches that no single event can reach on
// its own: the smaller of the series' `q` quantile (linear, as
// numpy.percentile) and the highest level reached at two frames more than
// `apart_s` apart (the largest x with values >= x at frames i, j where
// t_j - t_i > apart_s; 0 when no two frames are that far apart). With
// apart_s the longest an event can last, a clip-level percentile then needs
// at least two events, or one that lasts longer. NaN values are skipped;
// NaN when none are defined.
double recurring_quantile(std::span<const double> values, std::span<const double> times_s,
                          double q, double apart_s);

struct Pulse {
  int block = 0;
  int64_t start_frame = 0;  // frame where the first swing was confirmed
  int64_t end_frame = 0;    // frame where the swing back was confirmed
  double amplitude = 0;     // smaller of the two swings, in the changes' units
};

// The pulses that share their time with a pulse of a neighbouring block
// (8-neighbourhood on a grid `cols` wide, frame spans overlapping): a region
// that pulses is seldom smaller than two blocks, while the changes natural
// footage leaves behind (a glint, a caustic, a flow error at one edge) sit
// in one block at a time. Order is kept.
std::vector<Pulse> pulses_with_neighbours(const std::vector<Pulse>& pulses, int cols);

// For each pulse, in how many separate places the picture pulses within
// `within_s` of it: the blocks with a pulse whose span comes within that
// time of its span (`times_s[f]` the time of frame f; frame numbers stand
// for times when `times_s` is empty), grouped by 8-neighbourhood on a grid
// `cols` x `rows`, counted as groups. A region that pulses is one place,
// however large; light that plays over the scene - an aurora's curtains
// brightening here and there - pulses in several places at once.
std::vector<int> places_pulsing_around(const std::vector<Pulse>& pulses, std::span<const double> times_s,
                                       double within_s, int cols, int rows);

// A pulse is recorded when the swing back is confirmed; while that swing
// goes on - until it has come as far back as the first swing went, and for
// at most max_pulse_s after it was confirmed - its amplitude and end frame
// follow it.
class BlockPulseTracker {
 public:
  BlockPulseTracker(int blocks, double min_swing, double max_pulse_s);

  // One pair's block changes (NaN = unknown) ending at `frame`, time t_s.
  void add(int64_t frame, double t_s, std::span<const float> changes);

  // Forgets every block's level and swings, as at the start: a new shot
  // begins, and a pulse needs both its swings within one shot. Pulses found
  // so far stay.
  void restart();

  // Every pulse so far, in the order they were confirmed.
  const std::vector<Pulse>& pulses() const { return pulses_; }

 private:
  struct Block {
    flash::SwingTracker swings;
    float level = 0;
    bool started = false;
    bool has_turn = false;  // a swing was confirmed before
    int64_t turn_frame = 0;
    double turn_t_s = 0;
    float turn_origin = 0;  // origin of that swing
    int open_pulse = -1;    // pulse whose swing back is still going on
    float open_first = 0;   // that pulse's first swing
  };

  std::vector<Block> blocks_;
  std::vector<Pulse> pulses_;
  flash::SwingRule rule_;
  double max_pulse_s_;
};

}  // namespace clipwarden
