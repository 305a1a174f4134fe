// inject_defects: stream a clean clip through its defects into an encoder.
// Per input frame, in order: frames inside a drop are skipped; a freeze
// repeats the last written frame; a cut takes the next frame of its source;
// then jerk, region defects and whole-frame light changes draw on the frame.
// Regions follow the clean content (flow between clean frames), so an
// injected defect never steers its own tracking.
#include <algorithm>
#include <filesystem>
#include <memory>

#include <opencv2/imgproc.hpp>

#include "analyzer/core/byte_text.h"
#include "analyzer/encode/clip_writer.h"
#include "analyzer/inject/active_defect.h"
#include "clipwarden/clip_source.h"
#include "clipwarden/inject.h"
#include "clipwarden/report_io.h"

namespace clipwarden {
namespace {

using inject::ActiveDefect;
using inject::DefectClass;

bool replaces_frames(DefectClass c) {
  return c == DefectClass::freeze || c == DefectClass::drop || c == DefectClass::cut;
}

// Drawing order: displacement first, then regions, then whole-frame light.
int draw_order(DefectClass c) {
  if (c == DefectClass::jerk) return 0;
  if (c == DefectClass::flicker || c == DefectClass::strobe) return 2;
  return 1;
}

// The frames a cut splices in: a second reader of the source clip.
struct CutSource {
  std::unique_ptr<ClipSource> source;
  DecodedFrame frame;
  cv::Mat last;
  bool ended = false;
};

Expected<CutSource> open_cut_source(const std::string& clip_path, ActiveDefect& cut, const ClipInfo& info,
                                    double fps) {
  const auto& spec = cut.spec();
  const bool same_clip = spec.source_path.empty();
  const std::string path = same_clip ? clip_path : spec.source_path;
  SourceOptions options;
  options.working_long_side = 0;
  auto source = ClipSource::open(path, options);
  if (!source) return source.error();
  int64_t start = spec.source_start.value_or(0);
  if (!spec.source_start && same_clip) {
    // Far from the range by the strength in seconds: after it if the clip
    // is long enough, else before it.
    const int64_t here = cut.first_input();
    const int64_t offset = std::max<int64_t>(1, std::llround(spec.strength_value() * fps));
    const inject::SpecRange& r = spec.range;
    int64_t length = info.frame_count - here;
    if (r.end && !r.in_seconds) length = static_cast<int64_t>(*r.end) - here + 1;
    else if (r.end) length = std::llround((*r.end - r.start) * fps);
    if (here + offset + length <= info.frame_count) start = here + offset;
    else if (here - offset >= 0) start = here - offset;
    else
      return usage_error("--defect '" + spec.text + "'",
                         "the clip is too short for a cut " + std::to_string(spec.strength_value()) +
                             " s away; give source_start=");
  }
  CutSource cs{std::move(*source), {}, {}, false};
  for (int64_t i = 0; i < start; ++i) {
    auto got = cs.source->read(cs.frame);
    if (!got) return got.error();
    if (*got == FrameRead::end_of_clip)
      return usage_error("--defect '" + spec.text + "'",
                         "source_start " + std::to_string(start) + " is past the end of " + path);
  }
  cut.note("source", path);
  cut.note("source_start", start);
  return cs;
}

// The next spliced frame at the output size; the source's last frame is
// held if it runs out.
Expected<cv::Mat> next_cut_frame(CutSource& cs, cv::Size size) {
  if (!cs.ended) {
    auto got = cs.source->read(cs.frame);
    if (!got) return got.error();
    if (*got == FrameRead::frame) {
      if (cs.frame.bgr.size() == size) cs.last = cs.frame.bgr.clone();
      else cv::resize(cs.frame.bgr, cs.last, size, 0, 0, cv::INTER_AREA);
    } else {
      cs.ended = true;
    }
  }
  return cs.last.clone();
}

std::string default_truth_path(const std::string& output_path) {
  std::filesystem::path p(output_path);
  return (p.parent_path() / (p.stem().string() + ".truth.json")).string();
}

Error conflict(const ActiveDefect& a, const ActiveDefect& b, int64_t frame) {
  return usage_error("--defect '" + a.spec().text + "'",
                     "overlaps '" + b.spec().text + "' at input frame " + std::to_string(frame) +
                         " (freeze, drop and cut cannot share frames with another defect)");
}

class Injector {
 public:
  Injector(std::string clip_path, const InjectOptions& options) : clip_path_(std::move(clip_path)), options_(options) {}

  Expected<nlohmann::json> run() {
    if (Status s = parse(); !s) return s.error();
    SourceOptions source_options;
    source_options.working_long_side = 0;  // inject at the native size
    auto source = ClipSource::open(clip_path_, source_options);
    if (!source) return source.error();
    source_ = std::move(*source);
    const ClipInfo& info = source_->info();
    fps_ = info.fps > 0 ? info.fps : 25;

    DecodedFrame frame;
    for (;;) {
      auto got = source_->read(frame);
      if (!got) return got.error();
      if (*got == FrameRead::end_of_clip) break;
      if (Status s = process(frame); !s) return s.error();
    }
    return finish();
  }

 private:
  Status parse() {
    if (options_.defect_specs.empty()) return usage_error("--defect", "give at least one defect SPEC");
    if (options_.output_path.empty()) return usage_error("-o", "give the output clip's path");
    for (size_t i = 0; i < options_.defect_specs.size(); ++i) {
      auto spec = inject::parse_defect_spec(options_.defect_specs[i]);
      if (!spec) return spec.error();
      defects_.emplace_back(std::move(*spec), options_.seed, static_cast<int>(i));
    }
    cuts_.resize(defects_.size());
    return Ok{};
  }

  Status process(const DecodedFrame& frame) {
    const cv::Mat clean = frame.bgr;  // the decoder never overwrites a frame we still hold
    if (!prev_clean_.empty()) motion_.set_pair(prev_clean_, clean);
    inject::FrameContext ctx{frame.index, frame.t_s, &clean, &motion_, fps_, source_->info().frame_count};

    std::vector<size_t> active;
    for (size_t d = 0; d < defects_.size(); ++d)
      if (defects_[d].covers(frame.index, frame.t_s)) active.push_back(d);
    for (size_t a : active)
      for (size_t b : active)
        if (a != b && replaces_frames(defects_[a].cls())) return conflict(defects_[a], defects_[b], frame.index);

    prev_clean_ = clean;
    if (!active.empty() && defects_[active[0]].cls() == DefectClass::drop) {
      pending_drops_.push_back(active[0]);
      return Ok{};
    }
    cv::Mat out;
    if (!active.empty() && defects_[active[0]].cls() == DefectClass::freeze) {
      if (last_written_.empty())
        return usage_error("--defect '" + defects_[active[0]].spec().text + "'", "no earlier frame to repeat");
      out = last_written_.clone();
    } else if (!active.empty() && defects_[active[0]].cls() == DefectClass::cut) {
      auto spliced = splice(active[0], clean.size());
      if (!spliced) return spliced.error();
      out = std::move(*spliced);
    } else {
      out = clean.clone();
    }
    std::stable_sort(active.begin(), active.end(), [&](size_t a, size_t b) {
      return draw_order(defects_[a].cls()) < draw_order(defects_[b].cls());
    });
    for (size_t d : active) defects_[d].apply(out, ctx);

    if (!writer_) {
      ClipWriterOptions writer_options = options_.writer;
      writer_options.nominal_fps = fps_;
      auto writer = ClipWriter::create(options_.output_path, out.cols, out.rows, writer_options);
      if (!writer) return writer.error();
      writer_ = std::move(*writer);
    }
    if (Status s = writer_->write(out, frame.t_s); !s) return s;
    for (size_t d : active) defects_[d].record_output(output_index_, frame.t_s);
    for (size_t d : pending_drops_) defects_[d].record_output(output_index_, frame.t_s);
    pending_drops_.clear();
    last_written_ = out;
    ++output_index_;
    if (options_.on_progress) options_.on_progress(output_index_, source_->info().frame_count);
    return Ok{};
  }

  Expected<cv::Mat> splice(size_t d, cv::Size size) {
    if (!cuts_[d]) {
      auto opened = open_cut_source(clip_path_, defects_[d], source_->info(), fps_);
      if (!opened) return opened.error();
      cuts_[d] = std::make_unique<CutSource>(std::move(*opened));
    }
    return next_cut_frame(*cuts_[d], size);
  }

  Expected<nlohmann::json> finish() {
    if (!writer_) return input_error(clip_path_, "no video frames could be decoded");
    for (const auto& d : defects_) {
      if (d.recorded()) continue;
      const bool dropped_at_end = d.cls() == DefectClass::drop && d.covered_frames() > 0;
      return usage_error("--defect '" + d.spec().text + "'",
                         dropped_at_end ? "a drop needs a frame after it (the gap is seen there)"
                                        : "its range lies outside the clip's " +
                                              std::to_string(source_->info().frame_count) + " frames");
    }
    if (Status s = writer_->finish(); !s) return s.error();

    const ClipInfo& info = source_->info();
    nlohmann::json truth;
    truth["schema"] = kInjectTruthSchema;
    truth["source"] = {{"path", clip_path_}, {"frame_count", info.frame_count}, {"fps", fps_},
                       {"width", last_written_.cols}, {"height", last_written_.rows}};
    truth["output"] = {{"path", writer_->path()}, {"codec", to_string(writer_->codec())},
                       {"frame_count", writer_->frames_written()}};
    truth["seed"] = options_.seed;
    truth["defects"] = nlohmann::json::array();
    for (const auto& d : defects_) truth["defects"].push_back(d.truth());
    const std::string truth_path =
        options_.truth_path.empty() ? default_truth_path(writer_->path()) : options_.truth_path;
    if (Status s = write_file_atomic(truth_path, dump_json(truth, 1) + "\n"); !s) return s.error();
    truth["truth_path"] = truth_path;
    return truth;
  }

  std::string clip_path_;
  const InjectOptions& options_;
  std::vector<ActiveDefect> defects_;
  std::vector<std::unique_ptr<CutSource>> cuts_;
  std::unique_ptr<ClipSource> source_;
  std::unique_ptr<ClipWriter> writer_;
  inject::MotionField motion_;
  cv::Mat prev_clean_, last_written_;
  std::vector<size_t> pending_drops_;
  int64_t output_index_ = 0;
  double fps_ = 25;
};

}  // namespace

Expected<nlohmann::json> inject_defects(const std::string& clip_path, const InjectOptions& options) {
  return Injector(clip_path, options).run();
}

}  // namespace clipwarden
