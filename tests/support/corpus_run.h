// The real-footage corpus in the evaluation: a folder of camera clips and
// model outputs with a MANIFEST.tsv (file, kind, fps, frames, duration_s,
// notes, ...), read from a path and never copied into the repository. Camera
// clips are the false-alarm side: every verdict above pass on one of them is
// counted against the rules. Clips whose notes say "visible defect" are the
// positives a person saw.
#pragma once

#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "clipwarden/analysis.h"

namespace clipwarden::corpus {

struct CorpusClip {
  std::string file;  // name in clips/
  std::string path;  // full path
  bool camera = false;
  std::string codec;
  double fps = 0;
  double duration_s = 0;
  int frames = 0;  // stored frames (manifest column "frames"; 0 when absent)
  std::string notes;
  std::string defect;   // what the notes' "visible defect:" says, else empty
  std::string content;  // content type from the notes (content_type below)
};

// The corpus folder: `given` when not empty, else $CLIPWARDEN_CORPUS, else
// shared/corpus beside the checkout's parent folder; nullopt when the
// folder has no MANIFEST.tsv.
std::optional<std::string> find_corpus(const std::string& given = "");

// The manifest's clips, in its order. Missing columns or files are errors.
Expected<std::vector<CorpusClip>> read_manifest(const std::string& dir);

// The content that can fool a detector, from the notes' words, first match
// in this order: water, fire, foliage, crowd, fast motion, hand-held, static,
// other. Coarse on purpose: it groups clips for the tables.
std::string content_type(const std::string& notes);
// Frame-rate band of a clip's container rate: "<= 12", "12-20", "20-30", "> 30".
std::string rate_band(double fps);

struct CorpusResult {
  CorpusClip clip;
  std::optional<Report> report;
  std::string error;
};

// Analyses every clip (kind filter: "camera", "generated" or "" for all).
std::vector<CorpusResult> analyse_corpus(const std::vector<CorpusClip>& clips,
                                         const std::string& kind, const AnalysisSettings& settings,
                                         const Policy& policy,
                                         const std::function<void(const std::string&)>& log = {});

// Counts over the results, the figures the tables and the CI floors use.
struct CorpusCounts {
  int clips = 0, pass = 0, review = 0, reject = 0, errors = 0;
  double minutes = 0;
  int segments_above_info = 0;  // review or reject segments
  // Clips whose notes say what defect a person saw: how many, how many the
  // verdict flags (review or reject), and how many of those have a segment
  // above info at the time the note gives (noted_defect_time.h).
  int defects = 0, defects_flagged = 0, defects_at_noted_time = 0;
  double false_alarm_segments_per_minute() const {
    return minutes > 0 ? segments_above_info / minutes : 0;
  }
};
CorpusCounts count(const std::vector<CorpusResult>& results, bool camera);

// Markdown: camera clips' verdicts by content type and by frame-rate band,
// false-alarm segments per minute by metric, each camera clip not passed
// with its first reason, and the clips with a visible defect (whether they
// are flagged at the time their note gives).
std::string corpus_markdown(const std::vector<CorpusResult>& results);

}  // namespace clipwarden::corpus
