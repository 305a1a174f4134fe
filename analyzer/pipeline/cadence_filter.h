// Frame cadences: many files store each picture several times on purpose (a
// GIF holding every picture for 3 frames, 8 fps content in a 24 fps
// container, one frame in five repeated by a rate conversion). Analysing the
// stored repeats would judge the container, not the content: every repeat
// reads as a still frame and the pair after it as a jump of several frames'
// motion. The filter looks at the first stored frames, finds how many extra
// copies the clip's cadence gives a picture, and from then on leaves out
// the repeats that cadence explains, so the pictures are analysed at their
// real rate with their original timestamps. A picture held longer than the
// cadence explains is kept at the content's rate (one repeat per content
// interval), so it still reads as a freeze.
//
// Only a repeat's fate waits for the decision: a new picture is always
// analysed. So frames pass on at once until the first repeat, and only
// from there to the decision are they held (a clip without repeats, most
// generated ones, holds nothing and its analysis starts with its first
// frame, instead of after 30 decoded frames held in memory). A held repeat
// keeps only where it differs from the frame before it (held_frame.h).
#pragma once

#include <deque>
#include <memory>
#include <optional>
#include <vector>

#include <nlohmann/json.hpp>

#include "analyzer/frame/frame_pair.h"
#include "analyzer/pipeline/held_frame.h"

namespace clipwarden {

// What the filter found, written to the report as summary.cadence.details.
struct Cadence {
  int64_t stored_frames = 0;    // frames the file holds
  int64_t pictures = 0;         // distinct pictures among them
  int64_t analysed_frames = 0;  // frames analysed: the pictures, plus holds longer than the cadence
  int usual_repeats = 0;        // extra copies the cadence gives a picture (2: each stored 3 times)
  double repeated_share = 0;    // share of pictures stored more than once, where it was found
  double content_fps = 0;       // pictures per second of video
  std::vector<int64_t> source_frames;  // decoded index of each analysed frame

  nlohmann::json to_json() const;
};

class CadenceFilter {
 public:
  using Frame = std::shared_ptr<FramePlanes>;

  // lookahead: stored frames examined before the cadence is decided (those
  // from the first repeat on are held back until then); a shorter clip is
  // decided at its end.
  explicit CadenceFilter(size_t lookahead = kDefaultLookahead);

  // The next decoded frame (index = its decoded index; its gray plane
  // decides, its BGR and gray planes are kept). Appends the frames to
  // analyse, in order, to `ready`, renumbered 0, 1, ... in analysis order;
  // take() each one's planes when it is handed on.
  void push(Frame frame, std::vector<HeldFrame>& ready);
  // The stream ended: releases what is still held.
  void finish(std::vector<HeldFrame>& ready);

  // After finish(): the cadence found, or nullopt when the clip has none
  // (then every frame was analysed and indices are unchanged).
  std::optional<Cadence> cadence(double video_duration_s) const;
  // After finish(): the decoded index of every analysed frame.
  const std::vector<int64_t>& source_frames() const { return sources_; }

  static constexpr size_t kDefaultLookahead = 30;

  // What the filter held at most at once while deciding: frames kept in
  // full, and bytes of planes and differences (for the memory tests).
  size_t peak_held_full() const { return peak_held_full_; }
  size_t peak_held_bytes() const { return peak_held_bytes_; }

 private:
  void decide(bool at_end);
  void hold(HeldFrame frame, bool repeat);
  void release_held(std::vector<HeldFrame>& ready);
  void pass(HeldFrame frame, bool repeat, std::vector<HeldFrame>& ready);

  size_t lookahead_;
  bool decided_ = false;
  int usual_repeats_ = 0;  // 0: no cadence, nothing is left out
  double repeat_share_ = 0;
  std::vector<bool> looked_ahead_;               // before the decision: each frame a repeat?
  std::deque<std::pair<HeldFrame, bool>> held_;  // frame, is a repeat of the one before
  std::shared_ptr<const FramePlanes> last_;      // the previous decoded frame
  // The last frame held or passed in full: what a held repeat is kept as
  // a difference from (the picture it repeats, or an earlier copy of it).
  std::shared_ptr<const FramePlanes> base_;
  size_t held_full_ = 0, held_bytes_ = 0, peak_held_full_ = 0, peak_held_bytes_ = 0;
  int run_ = 0;  // repeats of the current picture so far
  int64_t stored_ = 0;
  int64_t pictures_ = 0;  // stored frames that are not repeats
  std::vector<int64_t> sources_;
};

// True when a CV_8UC1 picture has texture (grey standard deviation of at
// least 2 levels): only such a picture's repeats can show a stored cadence.
bool has_texture(const cv::Mat& gray);

// The cadence of a list of per-picture repeat counts (extra stored copies of
// each picture, in order): nullopt unless at least 3 pictures, and at least
// 15% of them, are stored more than once; else the smallest count that
// covers 90% of the pictures (a longer hold is a freeze, not the cadence).
// Returns {usual_repeats, share of pictures repeated}.
std::optional<std::pair<int, double>> usual_repeats(const std::vector<int>& repeats);

}  // namespace clipwarden
