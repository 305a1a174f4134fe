#include "analyzer/pipeline/report_assembly.h"

#include <algorithm>

#include "analyzer/segments/segmenter.h"
#include "analyzer/summary/summary.h"
#include "clipwarden/version.h"

namespace clipwarden {

Report assemble_report(const ReportInputs& in, MetricTable& table,
                       std::vector<std::unique_ptr<Metric>>& metrics) {
  Report report;
  report.tool_version = version();
  report.clip = in.source.info();
  report.clip.path = in.path;
  if (auto sha = sha256_file(in.path)) report.clip.sha256 = *sha;
  report.settings = settings_to_json(in.settings);
  table.move_into(report);

  // After the last read the source's facts are exact (frame count, the last
  // frame's real duration, average fps); the count is what was analysed.
  report.clip.frame_count = static_cast<int64_t>(report.frame_times_s.size());
  report.summary.stream = in.source.stream_facts();
  // A cadence is a fact of the stream, beside summary.stream: written
  // as summary.cadence.details (README, "Frame cadences").
  if (in.cadence) report.summary.details["cadence"] = in.cadence->to_json();
  for (auto& note : in.source.notes()) report.notes.push_back(note);

  for (auto& m : metrics) m->finish(report);  // may add details, objects, segments

  std::vector<Segment> found = segment_report(report, in.policy);
  report.segments.insert(report.segments.end(), found.begin(), found.end());
  std::stable_sort(report.segments.begin(), report.segments.end(),
                   [](const Segment& a, const Segment& b) { return a.start_frame < b.start_frame; });

  report.summary.metrics = summarise_series(report.series);
  report.summary.coherence = coherence_score(report.segments, report.clip.frame_count);
  report.verdict = evaluate_policy(report, in.policy);
  return report;
}

}  // namespace clipwarden
