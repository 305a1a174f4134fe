// Content and settings hashes for the results store (SHA-256, FIPS 180-4,
// analyzer/core/sha256.h).
#include <algorithm>
#include <filesystem>

#include "analyzer/core/sha256.h"
#include "clipwarden/clip_source.h"
#include "analyzer/store/hashing.h"
#include "clipwarden/version.h"

namespace clipwarden {

std::string sha256_hex(std::string_view bytes) {
  Sha256 sha;
  sha.update(bytes);
  return sha.hex_digest();
}

Expected<std::string> content_sha256(const std::string& clip_path) {
  namespace fs = std::filesystem;
  // The same check as every other entry point: a device or a pipe named as
  // a clip must be refused, not read until it ends (it may never end).
  if (auto st = check_clip_path(clip_path); !st) return st.error();
  std::error_code ec;
  if (!fs::is_directory(clip_path, ec)) return sha256_file(clip_path);
  std::vector<fs::path> files;
  for (const auto& entry : fs::directory_iterator(clip_path, ec))
    if (entry.is_regular_file()) files.push_back(entry.path());
  if (ec) return input_error(clip_path, "cannot list folder: " + ec.message());
  std::sort(files.begin(), files.end());
  std::string listing;
  for (const auto& f : files) {
    auto h = sha256_file(f.string());
    if (!h) return h.error();
    listing += f.filename().string() + " " + *h + "\n";
  }
  return sha256_hex(listing);
}

std::string settings_hash(const AnalysisSettings& settings, const Policy& policy) {
  AnalysisSettings canonical = settings;
  canonical.threads = 0;  // results never depend on the thread count
  nlohmann::json s = settings_to_json(canonical);
  if (s.is_object()) s.erase("threads");
  // nlohmann::json keeps object keys sorted, so dump() is canonical.
  return sha256_hex(s.dump() + "\n" + policy_to_json(policy).dump() + "\n" + version());
}

}  // namespace clipwarden
