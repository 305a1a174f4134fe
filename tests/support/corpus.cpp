#include "support/corpus.h"

#include <cstdlib>
#include <filesystem>
#include <string>

#include <gtest/gtest.h>

#include "clipwarden/analysis.h"
#include "clipwarden/policy.h"

namespace clipwarden::test {

std::string corpus_clip(const std::string& file) {
  const char* root = std::getenv("CLIPWARDEN_CORPUS");
  if (!root || !*root) return {};
  const std::filesystem::path path = std::filesystem::path(root) / "clips" / file;
  std::error_code ec;
  return std::filesystem::is_regular_file(path, ec) ? path.string() : std::string();
}

Report analyse_with_defaults(const std::string& path) {
  auto report = analyze_clip(path, AnalysisSettings{}, default_policy());
  if (!report) ADD_FAILURE() << path << ": " << report.error().message();
  return report ? std::move(*report) : Report{};
}

std::string flagged_segments(const Report& report, const std::string& metric) {
  std::string out;
  for (const Segment& s : report.segments) {
    if (s.metric != metric || s.severity == Severity::info) continue;
    if (!out.empty()) out += "; ";
    out += "frames " + std::to_string(s.start_frame) + "-" + std::to_string(s.end_frame) +
           " peak " + std::to_string(s.peak);
  }
  return out;
}

}  // namespace clipwarden::test
