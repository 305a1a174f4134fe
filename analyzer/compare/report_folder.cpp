#include "analyzer/core/json_text.h"
#include "analyzer/compare/report_folder.h"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <map>

#include "clipwarden/report_io.h"

namespace clipwarden::compare_detail {
namespace {

namespace fs = std::filesystem;
using nlohmann::json;

void add_if_defined(std::vector<std::pair<std::string, double>>& out, const std::string& key,
                    double v) {
  if (std::isfinite(v)) out.emplace_back(key, v);
}

// The .html page written beside a report, when there is one.
std::string page_beside(const std::string& report_path) {
  fs::path page(report_path);
  page.replace_extension(".html");
  std::error_code ec;
  return fs::is_regular_file(page, ec) ? page.string() : report_path;
}

std::string stem_of(const std::string& path) { return fs::path(path).stem().string(); }

// A queue field that may be written as a string or a number.
std::optional<std::string> text_field(const json& line, const char* key) {
  if (!line.contains(key)) return std::nullopt;
  const json& v = line[key];
  if (v.is_string()) return v.get<std::string>();
  if (v.is_number()) return v.dump();
  return std::nullopt;
}

// The report path of a queue line: "report" or "report_path" as a string,
// or a "report"/"reports" object holding "json".
std::optional<std::string> report_field(const json& line) {
  for (const char* key : {"report", "report_path", "json"})
    if (line.contains(key) && line[key].is_string()) return line[key].get<std::string>();
  for (const char* key : {"report", "reports"})
    if (line.contains(key) && line[key].is_object() && line[key].contains("json") &&
        line[key]["json"].is_string())
      return line[key]["json"].get<std::string>();
  return std::nullopt;
}

// Relative report paths are taken relative to the queue's folder first (a
// moved output folder still works), then to the working directory.
std::string resolve(const fs::path& dir, const std::string& path) {
  const fs::path p(path);
  if (p.is_absolute()) return path;
  std::error_code ec;
  if (fs::exists(dir / p, ec)) return (dir / p).string();
  if (fs::exists(p, ec)) return path;
  return (dir / p).string();
}

Expected<ClipEntry> load_clip(const std::string& report_path) {
  auto report = read_report_file(report_path);
  if (!report) return report.error();
  ClipEntry e;
  e.report_path = report_path;
  e.page_path = page_beside(report_path);
  e.name = stem_of(report_path);
  e.id = e.name;
  e.clip_path = report->clip.path;
  e.values = comparable_values(*report);
  e.verdict = report->verdict.status;
  return e;
}

void load_queue(const fs::path& dir, const std::string& side, LoadedFolder& out) {
  const fs::path queue = dir / "queue.jsonl";
  std::ifstream in(queue);
  std::string text;
  for (int number = 1; std::getline(in, text); ++number) {
    if (text.find_first_not_of(" \t\r") == std::string::npos) continue;
    const std::string where = queue.string() + " line " + std::to_string(number);
    const auto parsed = parse_json_text(text, where, ErrorKind::input);
    if (!parsed) {
      out.failed.push_back({side, where, parsed.error().cause, true});
      continue;
    }
    const json& line = *parsed;
    if (!line.is_object()) {
      out.failed.push_back({side, where, "is not a JSON object", true});
      continue;
    }
    const std::string label = text_field(line, "path").value_or(where);
    if (line.contains("error") && !line["error"].is_null() &&
        !(line["error"].is_string() && line["error"].get<std::string>().empty())) {
      const std::string error =
          line["error"].is_string() ? line["error"].get<std::string>() : line["error"].dump();
      out.failed.push_back({side, label, "not analysed by the gate: " + error, false});
      continue;
    }
    const auto report = report_field(line);
    if (!report) {
      out.failed.push_back({side, where, "names no report (key 'report')", true});
      continue;
    }
    auto clip = load_clip(resolve(dir, *report));
    if (!clip) {
      out.failed.push_back({side, resolve(dir, *report), clip.error().cause, true});
      continue;
    }
    if (auto id = text_field(line, "id")) clip->id = *id;
    if (auto p = text_field(line, "path")) clip->clip_path = *p;
    clip->prompt_id = text_field(line, "prompt_id");
    clip->model = text_field(line, "model");
    if (line.contains("seed")) clip->seed = line["seed"];
    out.clips.push_back(std::move(clip.value()));
  }
}

void load_plain_folder(const fs::path& dir, const std::string& side, LoadedFolder& out,
                       std::error_code& ec) {
  std::vector<std::string> reports;
  for (const auto& entry : fs::directory_iterator(dir, ec)) {
    const std::string file = entry.path().filename().string();
    if (entry.path().extension() != ".json" || file.front() == '.' || file == "compare.json")
      continue;
    if (entry.is_regular_file(ec)) reports.push_back(entry.path().string());
  }
  std::sort(reports.begin(), reports.end());
  for (const auto& path : reports) {
    auto clip = load_clip(path);
    if (clip)
      out.clips.push_back(std::move(clip.value()));
    else
      out.failed.push_back({side, path, clip.error().cause, true});
  }
}

}  // namespace

std::vector<std::pair<std::string, double>> comparable_values(const Report& report) {
  std::vector<std::pair<std::string, double>> out;
  add_if_defined(out, "coherence.score", report.summary.coherence);
  // One clip is all or nothing; averaged over a prompt's seeds these become
  // the share of its clips at that verdict.
  out.emplace_back("verdict.pass_share", report.verdict.status == Verdict::pass ? 1.0 : 0.0);
  out.emplace_back("verdict.reject_share", report.verdict.status == Verdict::reject ? 1.0 : 0.0);
  std::vector<std::string> known;  // every metric the report speaks of, in order
  auto know = [&](const std::string& m) {
    if (m != "coherence" && std::find(known.begin(), known.end(), m) == known.end())
      known.push_back(m);
  };
  for (const auto& m : report.summary.metrics) {
    know(m.metric);
    add_if_defined(out, m.metric + ".mean", m.mean);
    add_if_defined(out, m.metric + ".p50", m.p50);
    add_if_defined(out, m.metric + ".p95", m.p95);
    add_if_defined(out, m.metric + ".max", m.max);
  }
  for (const auto& s : report.series) know(s.metric);
  for (const auto& [name, details] : report.summary.details.items()) know(name);
  for (const auto& s : report.segments) know(s.metric);
  for (const auto& m : known) {
    const auto count = std::count_if(report.segments.begin(), report.segments.end(),
                                     [&](const Segment& s) { return s.metric == m; });
    out.emplace_back(m + ".segment_count", static_cast<double>(count));
  }
  return out;
}

Expected<LoadedFolder> load_report_folder(const std::string& dir, const std::string& side) {
  std::error_code ec;
  if (!fs::exists(dir, ec)) return input_error(dir, "no such folder");
  if (!fs::is_directory(dir, ec)) return input_error(dir, "is not a folder");
  LoadedFolder out;
  out.from_queue = fs::is_regular_file(fs::path(dir) / "queue.jsonl", ec);
  if (out.from_queue) {
    std::ifstream probe(fs::path(dir) / "queue.jsonl");
    if (!probe) return input_error(dir + "/queue.jsonl", "cannot be opened");
    load_queue(dir, side, out);
  } else {
    load_plain_folder(dir, side, out, ec);
    if (ec) return input_error(dir, "cannot be listed: " + ec.message());
  }
  if (out.clips.empty() && out.failed.empty())
    return input_error(dir, out.from_queue ? "queue.jsonl lists no clips"
                                           : "holds no reports (*.json) and no queue.jsonl");
  return out;
}

}  // namespace clipwarden::compare_detail
