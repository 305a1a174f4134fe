#include "support/compare_reports.h"

#include <algorithm>
#include <cstdio>
#include <cstdlib>

#include "clipwarden/report_io.h"
#include "clipwarden/version.h"

namespace clipwarden::test {
namespace {

// Linear interpolation between order statistics (Hyndman & Fan type 7).
double quantile(std::vector<double> v, double q) {
  std::sort(v.begin(), v.end());
  const double h = (v.size() - 1) * q;
  const size_t lo = static_cast<size_t>(h);
  const size_t hi = std::min(lo + 1, v.size() - 1);
  return v[lo] + (h - lo) * (v[hi] - v[lo]);
}

}  // namespace

Report synthetic_report(const SyntheticClip& clip) {
  Report r;
  r.tool_version = version();
  size_t frames = 0;
  for (const auto& [name, values] : clip.series) frames = std::max(frames, values.size());
  r.clip.path = clip.clip_path;
  r.clip.sha256 = std::string(64, '0');
  r.clip.container = "mp4";
  r.clip.codec = "h264";
  r.clip.width = 512;
  r.clip.height = 288;
  r.clip.fps = 24;
  r.clip.frame_count = static_cast<int64_t>(frames);
  r.clip.duration_s = frames / 24.0;
  r.clip.pix_fmt = "yuv420p";
  for (size_t i = 0; i < frames; ++i) r.frame_times_s.push_back(i / 24.0);
  for (const auto& [name, values] : clip.series) {
    r.series.push_back({name, values});
    std::vector<double> defined;
    for (double v : values)
      if (is_defined(v)) defined.push_back(v);
    double sum = 0;
    for (double v : defined) sum += v;
    r.summary.metrics.push_back({name, sum / defined.size(), quantile(defined, 0.5),
                                 quantile(defined, 0.95),
                                 *std::max_element(defined.begin(), defined.end())});
  }
  r.segments = clip.segments;
  r.summary.coherence = clip.coherence;
  r.verdict.status = clip.verdict;
  r.summary.stream.video_duration_s = r.clip.duration_s;
  return r;
}

namespace {
double uniform(std::mt19937_64& rng) { return static_cast<double>(rng() >> 11) * 0x1.0p-53; }
constexpr int kFrames = 48;
constexpr int kSpikeFrames[] = {6, 14, 22, 30, 38, 46};
}  // namespace

std::vector<PromptLevels> draw_prompt_levels(std::mt19937_64& rng, int count) {
  std::vector<PromptLevels> levels;
  for (int i = 0; i < count; ++i)
    levels.push_back(
        {0.002 + 0.01 * uniform(rng), 0.004 + 0.01 * uniform(rng), 2 + 6 * uniform(rng)});
  return levels;
}

SyntheticClip scenario_clip(std::mt19937_64& rng, const PromptLevels& levels,
                            const std::string& clip_path, bool inject_flicker) {
  SyntheticClip c;
  c.clip_path = clip_path;
  auto series = [&](double level) {
    std::vector<double> v(kFrames);
    for (auto& x : v) x = level * (0.8 + 0.4 * uniform(rng));
    v[0] = kUndefined;  // no previous frame
    return v;
  };
  c.series["warp_error"] = series(levels.warp);
  c.series["flicker"] = series(levels.flicker);
  c.series["drift"] = series(levels.drift);
  if (inject_flicker) {
    for (int f : kSpikeFrames) {
      c.series["flicker"][f] += 0.06;
      Segment s;
      s.metric = "flicker";
      s.start_frame = s.end_frame = s.peak_frame = f;
      s.start_s = s.end_s = f / 24.0;
      s.peak = c.series["flicker"][f];
      s.severity = Severity::review;
      c.segments.push_back(s);
    }
  }
  const Report report = synthetic_report(c);
  c.coherence = 100 - 600 * report.find_summary("flicker")->p95 -
                300 * report.find_summary("warp_error")->p95;
  return c;
}

void write_synthetic_report(const SyntheticClip& clip, const std::string& path) {
  // The invented reports must still be valid clipwarden.report/1 documents.
  const Report report = synthetic_report(clip);
  const auto valid = validate_report_json(report_to_json(report), path);
  if (!valid) {
    std::fprintf(stderr, "synthetic report is not valid: %s\n", valid.error().message().c_str());
    std::abort();
  }
  if (!write_json_report(report, path)) std::abort();
}

}  // namespace clipwarden::test
