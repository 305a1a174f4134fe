// Synthetic per-clip reports for the compare tests. The numbers are invented
// (drawn with a fixed seed by the tests) to exercise the plumbing of
// `clipwarden compare`; they are not measurements of any clip.
#pragma once

#include <map>
#include <random>
#include <string>
#include <vector>

#include "clipwarden/report.h"

namespace clipwarden::test {

struct SyntheticClip {
  std::string clip_path;                              // e.g. "clips/p03_s1.mp4"
  std::map<std::string, std::vector<double>> series;  // per-frame values by metric
  std::vector<Segment> segments;
  double coherence = 100;
  Verdict verdict = Verdict::pass;
};

// A complete report: clip facts for 24 fps, one row per frame, and the
// summary (mean, p50, p95, max) computed from the series.
Report synthetic_report(const SyntheticClip& clip);

// Writes it with write_json_report; aborts the test program on failure.
void write_synthetic_report(const SyntheticClip& clip, const std::string& path);

// The scenario of the compare tests: each prompt has its own level of
// warp_error, flicker and drift; each clip of it varies +-20% per frame
// around those levels (48 frames, frame 0 undefined). With inject_flicker,
// six frames jump by 0.06 in flicker, each a review segment. The coherence
// score is an invented function of the flicker and warp p95.
struct PromptLevels {
  double warp, flicker, drift;
};
std::vector<PromptLevels> draw_prompt_levels(std::mt19937_64& rng, int count);
SyntheticClip scenario_clip(std::mt19937_64& rng, const PromptLevels& levels,
                            const std::string& clip_path, bool inject_flicker);

}  // namespace clipwarden::test
