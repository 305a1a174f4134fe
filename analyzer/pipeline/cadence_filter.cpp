#include "analyzer/pipeline/cadence_filter.h"

#include <algorithm>
#include <cmath>
#include <tuple>

#include "analyzer/metrics/image_error.h"

namespace clipwarden {

// A cadence needs repeats to be a habit of the clip, not an accident: at
// least this many pictures repeated, and this share of them. (Our choices:
// 24->30 fps pulldown repeats one picture in four, 25%; the opening stills
// of a camera clip are one or two pictures.)
constexpr int kMinRepeatedPictures = 3;
constexpr double kMinRepeatedShare = 0.15;
// The usual run covers this share of the pictures; the rest are holds.
constexpr double kUsualShare = 0.9;
// Grey standard deviation (8-bit levels) below which a picture is flat.
constexpr double kMinTextureStdDev = 2.0;

bool has_texture(const cv::Mat& gray) {
  cv::Scalar mean, stddev;
  cv::meanStdDev(gray, mean, stddev);
  return stddev[0] >= kMinTextureStdDev;
}

std::optional<std::pair<int, double>> usual_repeats(const std::vector<int>& repeats) {
  const auto repeated = std::count_if(repeats.begin(), repeats.end(), [](int r) { return r > 0; });
  if (repeated < kMinRepeatedPictures ||
      static_cast<double>(repeated) < kMinRepeatedShare * static_cast<double>(repeats.size()))
    return std::nullopt;
  std::vector<int> sorted = repeats;
  std::sort(sorted.begin(), sorted.end());
  // The smallest r with at least 90% of the pictures at or below it.
  const auto covered =
      static_cast<size_t>(std::ceil(kUsualShare * static_cast<double>(sorted.size())));
  const int usual = sorted[std::max<size_t>(covered, 1) - 1];
  if (usual == 0) return std::nullopt;
  return std::make_pair(usual, static_cast<double>(repeated) / static_cast<double>(repeats.size()));
}

CadenceFilter::CadenceFilter(size_t lookahead) : lookahead_(std::max<size_t>(lookahead, 2)) {}

void CadenceFilter::push(Frame frame, std::vector<HeldFrame>& ready) {
  // A flat picture (a uniform field, a fade's black) repeats because
  // nothing in it can change, not because the file stores it twice: only a
  // picture with texture counts as a stored repeat.
  const bool repeat = last_ && same_picture(frame->gray, last_->gray) && has_texture(frame->gray);
  last_ = frame;
  ++stored_;
  if (!repeat) ++pictures_;
  if (decided_) {
    pass(HeldFrame(std::move(frame)), repeat, ready);
    return;
  }
  looked_ahead_.push_back(repeat);
  // Nothing held and a new picture: it is analysed whatever the cadence.
  if (held_.empty() && !repeat) {
    base_ = frame;
    pass(HeldFrame(std::move(frame)), false, ready);
  } else {
    // A held frame waits without its luminance plane (a recycled frame may
    // still have one): that is made when the frame is handed on.
    frame->luminance.release();
    HeldFrame held = repeat ? HeldFrame::repeat_of(frame, base_) : HeldFrame(frame);
    if (held.in_full()) base_ = std::move(frame);
    hold(std::move(held), repeat);
  }
  if (looked_ahead_.size() >= lookahead_) {
    decide(false);
    release_held(ready);
  }
}

void CadenceFilter::hold(HeldFrame frame, bool repeat) {
  held_full_ += frame.in_full() ? 1 : 0;
  held_bytes_ += frame.held_bytes();
  peak_held_full_ = std::max(peak_held_full_, held_full_);
  peak_held_bytes_ = std::max(peak_held_bytes_, held_bytes_);
  held_.emplace_back(std::move(frame), repeat);
}

void CadenceFilter::finish(std::vector<HeldFrame>& ready) {
  if (!decided_) decide(true);
  release_held(ready);
  last_.reset();
  base_.reset();
}

void CadenceFilter::release_held(std::vector<HeldFrame>& ready) {
  while (!held_.empty()) {
    auto [f, r] = std::move(held_.front());
    held_.pop_front();
    pass(std::move(f), r, ready);
  }
  held_full_ = held_bytes_ = 0;
  // Nothing is held from here on: no frame needs a base.
  base_.reset();
}

void CadenceFilter::decide(bool at_end) {
  decided_ = true;
  std::vector<int> repeats;
  for (const bool repeat : looked_ahead_) {
    if (!repeat)
      repeats.push_back(0);
    else if (!repeats.empty())
      ++repeats.back();
  }
  // The last picture's hold may go on past the look-ahead.
  if (!at_end && !repeats.empty()) repeats.pop_back();
  if (auto found = usual_repeats(repeats)) std::tie(usual_repeats_, repeat_share_) = *found;
  looked_ahead_ = {};
}

void CadenceFilter::pass(HeldFrame frame, bool repeat, std::vector<HeldFrame>& ready) {
  run_ = repeat ? run_ + 1 : 0;
  // With a cadence of u extra copies a picture lasts u + 1 stored frames;
  // a longer hold keeps one copy per such interval (the content's rate).
  if (repeat && usual_repeats_ > 0 && run_ % (usual_repeats_ + 1) != 0) return;
  sources_.push_back(frame.index());
  frame.renumber(static_cast<int64_t>(sources_.size()) - 1);
  ready.push_back(std::move(frame));
}

std::optional<Cadence> CadenceFilter::cadence(double video_duration_s) const {
  if (usual_repeats_ == 0) return std::nullopt;
  Cadence c;
  c.stored_frames = stored_;
  c.analysed_frames = static_cast<int64_t>(sources_.size());
  c.pictures = pictures_;
  c.source_frames = sources_;
  c.usual_repeats = usual_repeats_;
  c.repeated_share = repeat_share_;
  if (video_duration_s > 0) c.content_fps = static_cast<double>(pictures_) / video_duration_s;
  return c;
}

nlohmann::json Cadence::to_json() const {
  return {{"stored_frames", stored_frames},     {"pictures", pictures},
          {"analysed_frames", analysed_frames}, {"usual_repeats", usual_repeats},
          {"repeated_share", repeated_share},   {"content_fps", content_fps},
          {"source_frames", source_frames}};
}

}  // namespace clipwarden
