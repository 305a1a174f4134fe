// Which reader a clip needs, and `probe` as JSON.
#include "clipwarden/clip_source.h"

#include <filesystem>

#include "analyzer/decode/image_sources.h"
#include "analyzer/decode/libav_source.h"
#include "clipwarden/report_io.h"

namespace clipwarden {

Expected<std::unique_ptr<ClipSource>> ClipSource::open(const std::string& path,
                                                       const SourceOptions& options) {
  if (auto st = check_clip_path(path); !st) return st.error();
  std::error_code ec;
  if (std::filesystem::is_directory(path, ec)) return decode::open_folder_source(path, options);
  if (decode::looks_like_webp(path)) return decode::open_webp_source(path, options);
  return decode::open_libav_source(path, options);
}

Expected<nlohmann::json> probe_clip(const std::string& path, const SourceOptions& options) {
  if (auto st = check_clip_path(path); !st) return st.error();
  std::error_code ec;
  auto facts = std::filesystem::is_directory(path, ec) ? decode::probe_folder(path, options)
               : decode::looks_like_webp(path)         ? decode::probe_webp(path)
                                                       : decode::probe_libav(path);
  if (!facts) return facts.error();
  if (!std::filesystem::is_directory(path, ec)) {
    auto sha256 = sha256_file(path);
    if (!sha256) return sha256.error();
    facts->first.sha256 = *sha256;
  }
  // Written by the report's own serialiser so the keys are the report's.
  Report report;
  report.clip = std::move(facts->first);
  report.summary.stream = facts->second;
  const nlohmann::json written = report_to_json(report);
  nlohmann::json out = written.at("clip");
  out["stream"] = written.at("summary").at("stream");
  return out;
}

}  // namespace clipwarden
