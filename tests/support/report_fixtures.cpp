#include "support/report_fixtures.h"

namespace clipwarden::fixtures {

Report small_report() {
  Report r;
  r.tool_version = "test";
  r.clip.path = "shots/harbour take 1.mp4";
  r.clip.sha256 = std::string(64, 'a');
  r.clip.container = "mov,mp4,m4a,3gp,3g2,mj2";
  r.clip.codec = "h264";
  r.clip.width = 512;
  r.clip.height = 288;
  r.clip.fps = 10;
  r.clip.frame_count = 10;
  r.clip.duration_s = 1.0;
  r.clip.pix_fmt = "yuv420p";
  r.settings = {{"preset", "balanced"}};
  for (int i = 0; i < 10; ++i) r.frame_times_s.push_back(i / 10.0);
  MetricSeries warp{"warp_error", std::vector<double>(10, 0.002)};
  warp.values[0] = kUndefined;
  warp.values[5] = 0.05;
  r.series.push_back(warp);
  r.series.push_back({"flicker", std::vector<double>(10, 0.001)});
  r.segments.push_back({"warp_error", 5, 5, 0.5, 0.5, 0.05, 5, Severity::review});
  r.summary.metrics.push_back({"warp_error", 0.007, 0.002, 0.03, 0.05});
  r.summary.metrics.push_back({"flicker", 0.001, 0.001, 0.001, 0.001});
  r.summary.coherence = 95;
  r.summary.stream.video_duration_s = 1.0;
  r.verdict.status = Verdict::review;
  r.verdict.reasons.push_back("warp_error segment peak 0.05 >= review 0.02 (frame 5, 0.50 s)");
  return r;
}

}  // namespace clipwarden::fixtures
