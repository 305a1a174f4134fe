#include "support/corpus_run.h"

#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <set>
#include <sstream>

#include "support/noted_defect_time.h"

namespace clipwarden::corpus {
namespace {

std::vector<std::string> split_tabs(const std::string& line) {
  std::vector<std::string> out;
  std::stringstream in(line);
  for (std::string field; std::getline(in, field, '\t');) out.push_back(field);
  return out;
}

bool mentions(const std::string& text, std::initializer_list<const char*> words) {
  std::string lower = text;
  std::transform(lower.begin(), lower.end(), lower.begin(),
                 [](unsigned char c) { return std::tolower(c); });
  for (const char* w : words)
    if (lower.find(w) != std::string::npos) return true;
  return false;
}

std::string fmt(const char* format, double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, format, v);
  return buf;
}

double minutes_of(const CorpusResult& r) {
  if (r.report && r.report->summary.stream.video_duration_s > 0)
    return r.report->summary.stream.video_duration_s / 60;
  return r.clip.duration_s / 60;
}

FlagTiming timing_of(const CorpusResult& r) {
  return flag_timing(*r.report, noted_time(r.clip.defect, r.clip.fps, r.clip.frames), r.clip.fps);
}

int segments_above_info(const Report& r) {
  return static_cast<int>(std::count_if(r.segments.begin(), r.segments.end(), [](const Segment& s) {
    return s.severity != Severity::info;
  }));
}

// Camera clips' segments above info per minute, one row per group (content
// type or frame-rate band) and one column per metric that has any: which
// rule fires on which kind of natural footage.
std::string by_metric_table(const std::vector<CorpusResult>& results, const std::string& heading,
                            const std::function<std::string(const CorpusResult&)>& group_of) {
  std::map<std::string, std::map<std::string, int>> counts;  // group -> metric -> segments
  std::map<std::string, double> minutes;
  std::set<std::string> metrics;
  for (const auto& r : results) {
    if (!r.clip.camera || !r.report) continue;
    const std::string g = group_of(r);
    minutes[g] += minutes_of(r);
    counts[g];
    for (const auto& s : r.report->segments)
      if (s.severity != Severity::info) ++counts[g][s.metric], metrics.insert(s.metric);
  }
  if (metrics.empty()) return "\nNo camera clip has a segment above info.\n";
  std::string md = "\nSegments above info per minute of camera footage, by " + heading + " and metric:\n\n| " +
                   heading + " | minutes";
  for (const auto& m : metrics) md += " | " + m;
  md += " |\n|---|---";
  for (size_t i = 0; i < metrics.size(); ++i) md += "|---";
  md += "|\n";
  for (const auto& [g, by] : counts) {
    md += "| " + g + " | " + fmt("%.2f", minutes[g]);
    for (const auto& m : metrics) {
      const auto it = by.find(m);
      md += " | " + (it == by.end() ? std::string("–") : fmt("%.2f", it->second / std::max(minutes[g], 1e-9)));
    }
    md += " |\n";
  }
  return md;
}

}  // namespace

std::optional<std::string> find_corpus(const std::string& given) {
  std::string dir = given;
  if (dir.empty())
    if (const char* env = std::getenv("CLIPWARDEN_CORPUS")) dir = env;
  if (dir.empty())
    dir =
        (std::filesystem::path(CLIPWARDEN_SOURCE_DIR).parent_path() / "shared" / "corpus").string();
  std::error_code ec;
  if (!std::filesystem::is_regular_file(std::filesystem::path(dir) / "MANIFEST.tsv", ec))
    return std::nullopt;
  return dir;
}

Expected<std::vector<CorpusClip>> read_manifest(const std::string& dir) {
  const std::string path = dir + "/MANIFEST.tsv";
  std::ifstream in(path);
  if (!in) return input_error(path, "cannot be read");
  std::string line;
  if (!std::getline(in, line)) return input_error(path, "is empty");
  const auto header = split_tabs(line);
  std::map<std::string, size_t> column;
  for (size_t i = 0; i < header.size(); ++i) column[header[i]] = i;
  for (const char* need : {"file", "kind", "codec", "fps", "duration_s", "notes"})
    if (!column.count(need)) return input_error(path, std::string("has no column '") + need + "'");
  std::vector<CorpusClip> clips;
  for (int row = 2; std::getline(in, line); ++row) {
    if (line.empty()) continue;
    const auto f = split_tabs(line);
    if (f.size() < header.size())
      return input_error(path, "row " + std::to_string(row) + " has too few fields");
    CorpusClip c;
    c.file = f[column["file"]];
    c.path = dir + "/clips/" + c.file;
    c.camera = f[column["kind"]] == "camera";
    c.codec = f[column["codec"]];
    c.fps = std::atof(f[column["fps"]].c_str());
    c.duration_s = std::atof(f[column["duration_s"]].c_str());
    if (column.count("frames")) c.frames = std::atoi(f[column["frames"]].c_str());
    c.notes = f[column["notes"]];
    const auto seen = c.notes.find("visible defect");
    if (seen != std::string::npos) c.defect = c.notes.substr(seen);
    c.content = content_type(c.notes);
    std::error_code ec;
    if (!std::filesystem::is_regular_file(c.path, ec))
      return input_error(c.path, "is listed in the manifest but missing");
    clips.push_back(std::move(c));
  }
  return clips;
}

std::string content_type(const std::string& notes) {
  if (mentions(notes, {"water", "sea ", "ocean", "pool", "underwater", "wave", "lake", "aquarium"}))
    return "water";
  if (mentions(notes, {"fire", "flame", "firework", "explosion"})) return "fire";
  if (mentions(notes, {"foliage", "tree", "plant", "grass", "leaf", "leaves"})) return "foliage";
  if (mentions(notes, {"crowd", "pedestrian", "shoppers", "people"})) return "crowd";
  if (mentions(notes, {"fast", "whip", "motion blur", "galloping", "dancing", "waving"}))
    return "fast motion";
  if (mentions(notes, {"hand-held", "handheld", "shaky", "shake"})) return "hand-held";
  if (mentions(notes, {"static", "near-frozen", "still"})) return "static";
  return "other";
}

std::string rate_band(double fps) {
  if (fps <= 12) return "<= 12";
  if (fps <= 20) return "12-20";
  if (fps <= 30.5) return "20-30";
  return "> 30";
}

std::vector<CorpusResult> analyse_corpus(const std::vector<CorpusClip>& clips,
                                         const std::string& kind, const AnalysisSettings& settings,
                                         const Policy& policy,
                                         const std::function<void(const std::string&)>& log) {
  std::vector<CorpusResult> out;
  for (const auto& c : clips) {
    if ((kind == "camera" && !c.camera) || (kind == "generated" && c.camera)) continue;
    CorpusResult r{c, std::nullopt, ""};
    auto report = analyze_clip(c.path, settings, policy);
    if (report)
      r.report = std::move(*report);
    else
      r.error = report.error().message();
    if (log)
      log(c.file + ": " + (r.report ? to_string(r.report->verdict.status) : "error " + r.error));
    out.push_back(std::move(r));
  }
  return out;
}

CorpusCounts count(const std::vector<CorpusResult>& results, bool camera) {
  CorpusCounts n;
  for (const auto& r : results) {
    if (r.clip.camera != camera) continue;
    ++n.clips;
    if (!r.report) {
      ++n.errors;
      continue;
    }
    n.minutes += minutes_of(r);
    n.segments_above_info += segments_above_info(*r.report);
    if (!r.clip.defect.empty()) {
      ++n.defects;
      n.defects_flagged += r.report->verdict.status != Verdict::pass;
      n.defects_at_noted_time += timing_of(r) == FlagTiming::at_noted_time;
    }
    switch (r.report->verdict.status) {
      case Verdict::pass:
        ++n.pass;
        break;
      case Verdict::review:
        ++n.review;
        break;
      case Verdict::reject:
        ++n.reject;
        break;
    }
  }
  return n;
}

std::string corpus_markdown(const std::vector<CorpusResult>& results) {
  std::string md;
  for (bool camera : {true, false}) {
    const CorpusCounts n = count(results, camera);
    if (n.clips == 0) continue;
    md += std::string("\n### ") + (camera ? "Camera clips (false-alarm side)" : "Generated clips") +
          "\n\n";
    md += std::to_string(n.clips) + " clips, " + fmt("%.2f", n.minutes) + " min: pass " +
          std::to_string(n.pass) + ", review " + std::to_string(n.review) + ", reject " +
          std::to_string(n.reject) + (n.errors ? ", errors " + std::to_string(n.errors) : "") +
          "; segments above info " + fmt("%.2f", n.false_alarm_segments_per_minute()) + "/min\n";
    if (n.defects > 0)
      md += "\nWith a defect seen by eye: " + std::to_string(n.defects) + " clips, " +
            std::to_string(n.defects_flagged) + " flagged, " + std::to_string(n.defects_at_noted_time) +
            " of them by a segment at the time the note gives.\n";
    if (!camera) continue;
    // By content type and by frame-rate band.
    for (int by = 0; by < 2; ++by) {
      std::map<std::string, std::vector<const CorpusResult*>> groups;
      for (const auto& r : results)
        if (r.clip.camera) groups[by == 0 ? r.clip.content : rate_band(r.clip.fps)].push_back(&r);
      md += std::string("\n| ") + (by == 0 ? "content" : "frame rate (fps)") +
            " | clips | minutes | pass | review | reject | segments above info / min "
            "|\n|---|---|---|---|---|---|---|\n";
      for (const auto& [name, rs] : groups) {
        int pass = 0, review = 0, reject = 0, segs = 0;
        double minutes = 0;
        for (const auto* r : rs) {
          if (!r->report) continue;
          minutes += minutes_of(*r);
          segs += segments_above_info(*r->report);
          const Verdict v = r->report->verdict.status;
          pass += v == Verdict::pass, review += v == Verdict::review,
              reject += v == Verdict::reject;
        }
        md += "| " + name + " | " + std::to_string(rs.size()) + " | " + fmt("%.2f", minutes) +
              " | " + std::to_string(pass) + " | " + std::to_string(review) + " | " +
              std::to_string(reject) + " | " + fmt("%.2f", minutes > 0 ? segs / minutes : 0) +
              " |\n";
      }
    }
    md += by_metric_table(results, "content", [](const CorpusResult& r) { return r.clip.content; });
    md += by_metric_table(results, "frame rate (fps)", [](const CorpusResult& r) { return rate_band(r.clip.fps); });
    // Segments by metric and severity.
    std::map<std::string, std::pair<int, int>> by_metric;  // review, reject
    for (const auto& r : results)
      if (r.clip.camera && r.report)
        for (const auto& s : r.report->segments) {
          if (s.severity == Severity::review) ++by_metric[s.metric].first;
          if (s.severity == Severity::reject) ++by_metric[s.metric].second;
        }
    md += "\n| metric | review segments | reject segments | per minute |\n|---|---|---|---|\n";
    for (const auto& [metric, c] : by_metric)
      md += "| " + metric + " | " + std::to_string(c.first) + " | " + std::to_string(c.second) +
            " | " + fmt("%.2f", n.minutes > 0 ? (c.first + c.second) / n.minutes : 0) + " |\n";
  }
  md += "\n| clip | kind | fps | content | verdict | flagged | first reason |\n|---|---|---|---|---|---|---|\n";
  for (const auto& r : results) {
    const bool listed = r.clip.camera ? (!r.report || r.report->verdict.status != Verdict::pass)
                                      : !r.clip.defect.empty();
    if (!listed) continue;
    std::string reason =
        r.report ? (r.report->verdict.reasons.empty() ? "" : r.report->verdict.reasons[0])
                 : r.error;
    std::replace(reason.begin(), reason.end(), '|', '/');
    md += "| " + r.clip.file + " | " +
          (r.clip.camera ? "camera" : "generated, " + r.clip.defect.substr(0, 60)) + " | " +
          fmt("%.3g", r.clip.fps) + " | " + r.clip.content + " | " +
          (r.report ? to_string(r.report->verdict.status) : "error") + " | " +
          (r.report && !r.clip.defect.empty() ? to_string(timing_of(r)) : "") + " | " + reason + " |\n";
  }
  return md;
}

}  // namespace clipwarden::corpus
