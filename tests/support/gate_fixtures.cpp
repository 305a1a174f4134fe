#include "support/gate_fixtures.h"

#include "analyzer/summary/summary.h"

namespace clipwarden::fixtures {

Report gate_report(int frames, double fps, const std::string& path) {
  Report r;
  r.tool_version = "test";
  r.clip.path = path;
  r.clip.container = "mov,mp4,m4a,3gp,3g2,mj2";
  r.clip.codec = "h264";
  r.clip.width = 160;
  r.clip.height = 120;
  r.clip.fps = fps;
  r.clip.frame_count = frames;
  r.clip.duration_s = frames / fps;
  r.clip.pix_fmt = "yuv420p";
  for (int i = 0; i < frames; ++i) r.frame_times_s.push_back(i / fps);
  r.summary.coherence = 100;
  r.summary.stream.video_duration_s = frames / fps;
  return r;
}

void add_series(Report& r, const std::string& metric, double base, double value, int first,
                int last) {
  MetricSeries s{metric, std::vector<double>(r.frame_times_s.size(), base)};
  for (int i = first; i >= 0 && i <= last; ++i) s.values[i] = value;
  r.series.push_back(std::move(s));
  r.summary.metrics = summarise_series(r.series);
}

void add_segment(Report& r, const std::string& metric, int first, int last, double peak,
                 Severity severity) {
  r.segments.push_back(
      {metric, first, last, r.frame_times_s[first], r.frame_times_s[last], peak, first, severity});
}

}  // namespace clipwarden::fixtures
