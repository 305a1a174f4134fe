#include "analyzer/review/review_folder.h"

#include <algorithm>
#include <cctype>
#include <filesystem>

#include "analyzer/gate/queue_page.h"
#include "analyzer/metrics/metric_descriptor.h"

namespace clipwarden::review {
namespace fs = std::filesystem;
namespace {

std::string existing_file(const std::string& path, const fs::path& dir) {
  if (path.empty()) return "";
  std::error_code ec;
  const fs::path p(path);
  for (const fs::path& candidate : {p.is_absolute() ? p : fs::absolute(p, ec), dir / p})
    if (fs::is_regular_file(candidate, ec)) return candidate.lexically_normal().string();
  return "";
}

// The report's absolute path when it lies inside `dir` (a queue edited to
// name ../../something gets nothing served).
std::string report_inside(const std::string& report, const fs::path& dir) {
  if (report.empty()) return "";
  std::error_code ec;
  const fs::path root = fs::weakly_canonical(dir, ec);
  const fs::path full = fs::weakly_canonical(dir / report, ec);
  if (ec) return "";
  const auto rel = full.lexically_relative(root);
  if (rel.empty() || *rel.begin() == "..") return "";
  return fs::is_regular_file(full, ec) ? full.string() : "";
}

// The leading clause of a column description: the words a person reads.
std::string short_description(const std::string& description) {
  size_t end = description.size();
  for (const char* stop : {" (", ";", ". ", ": "}) end = std::min(end, description.find(stop));
  std::string out = description.substr(0, end);
  if (!out.empty() && out.back() == '.') out.pop_back();
  return out;
}

}  // namespace

std::string reason_metric(const std::string& reason) {
  // The policy words a metric's reason "<metric> <statistic> ..." or
  // "<metric> segment peak ..."; hard rules ("flash hazard: ...") differ.
  const size_t space = reason.find(' ');
  if (space == std::string::npos) return "";
  const std::string first = reason.substr(0, space);
  const size_t end = reason.find(' ', space + 1);
  const std::string second = reason.substr(space + 1, end == std::string::npos ? end : end - space - 1);
  const auto& stats = policy_statistics();
  const bool statistic = second == "segment" || second.rfind("details.", 0) == 0 ||
                         std::find(stats.begin(), stats.end(), second) != stats.end();
  return statistic && find_column(first) ? first : "";
}

std::string reason_in_words(const std::string& reason) {
  const std::string metric = reason_metric(reason);
  if (metric.empty()) return reason;
  std::string level;
  if (reason.find(">= reject") != std::string::npos)
    level = "reject level";
  else if (reason.find(">= review") != std::string::npos)
    level = "review level";
  std::string where, seen;
  const size_t open = reason.find(" (");
  if (open != std::string::npos) {
    const size_t close = reason.find(')', open);
    where = reason.substr(open + 2, close == std::string::npos ? std::string::npos : close - open - 2);
    // The policy follows the place with what was seen in plain words
    // ("...: the picture stands still for 1.3 s"): the words a person reads.
    const size_t words = close == std::string::npos ? std::string::npos : reason.find(": ", close);
    if (words != std::string::npos) seen = reason.substr(words + 2);
  }
  std::string out = seen.empty() ? short_description(find_column(metric)->description) : seen;
  if (!out.empty()) out[0] = static_cast<char>(std::toupper(static_cast<unsigned char>(out[0])));
  if (!level.empty()) out += ": " + level;
  if (!where.empty()) out += (level.empty() ? ": " : ", ") + where;
  return out;
}

const ReviewClip* ReviewFolder::find(const std::string& key) const {
  for (const auto& c : clips)
    if (c.key == key) return &c;
  return nullptr;
}

Expected<ReviewFolder> load_review_folder(const std::string& dir) {
  auto results = read_queue(dir);
  if (!results) return results.error();
  ReviewFolder folder;
  folder.dir = dir;
  for (size_t i : worst_first_order(*results)) {
    ReviewClip c;
    c.result = (*results)[i];
    c.key = std::to_string(c.result.input.index);
    c.video_path = existing_file(c.result.input.path, dir);
    c.report_json = report_inside(c.result.report, dir);
    if (!c.report_json.empty()) {
      fs::path html(c.report_json);
      html.replace_extension(".html");
      std::error_code ec;
      if (fs::is_regular_file(html, ec)) c.report_html = html.string();
    }
    if (!c.result.reasons.empty()) c.headline = reason_in_words(c.result.reasons.front());
    for (const auto& r : c.result.reasons) {
      const std::string m = reason_metric(r);
      if (!m.empty() && std::find(c.metrics.begin(), c.metrics.end(), m) == c.metrics.end())
        c.metrics.push_back(m);
    }
    folder.clips.push_back(std::move(c));
  }
  return folder;
}

}  // namespace clipwarden::review
