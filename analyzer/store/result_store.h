// The results store: one SQLite row per analysis, keyed by the clip's
// content hash and the settings hash, so a clip analysed before with the same
// settings, policy and tool version is never recomputed. Many threads of one
// process may share a ResultStore; many processes may share one file (WAL
// mode, busy timeout; not on network file systems, where SQLite's locking is
// unreliable).
#pragma once

#include <cstdint>
#include <memory>
#include <mutex>
#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "clipwarden/error.h"
#include "clipwarden/report.h"

struct sqlite3;

namespace clipwarden {

struct StoredAnalysis {
  int64_t row_id = 0;          // set by insert()
  std::string content_sha256;  // of the clip's bytes (content_sha256())
  std::string settings_hash;   // settings_hash()
  std::string tool_version;
  std::string clip_id;
  std::string clip_path;
  std::string model;      // model tag, "" when unknown
  std::string prompt_id;  // "" when unknown
  Verdict verdict = Verdict::pass;
  double coherence = 0;
  std::vector<std::string> reasons;
  nlohmann::json summary = nlohmann::json::object();  // the report's summary JSON
  std::string report_path;                            // absolute path of the JSON report
  std::string created_at;                             // ISO 8601 UTC, set by insert() when empty
};

class ResultStore {
 public:
  // Opens or creates the store file (and its schema). Errors name the file.
  static Expected<std::unique_ptr<ResultStore>> open(const std::string& path);
  ~ResultStore();
  ResultStore(const ResultStore&) = delete;
  ResultStore& operator=(const ResultStore&) = delete;

  const std::string& path() const { return path_; }

  // The newest analysis of this content under these settings, if any.
  Expected<std::optional<StoredAnalysis>> find(const std::string& content_sha256,
                                               const std::string& settings_hash);
  // Adds one row in its own transaction; sets row.row_id (and created_at).
  // A row with the same content, settings and clip id is never kept twice:
  // the new row replaces it.
  Status insert(StoredAnalysis& row);
  // Two gates sharing a store must not both analyse a clip: before
  // analysing, a gate claims the content under its settings. Claim::taken
  // when this process now holds the claim; Claim::held_elsewhere when a live
  // process holds it (the caller waits for that one's row). A claim of a
  // process that has ended is taken over. release() drops this process's
  // claim.
  enum class Claim { taken, held_elsewhere };
  Expected<Claim> claim(const std::string& content_sha256, const std::string& settings_hash);
  Status release(const std::string& content_sha256, const std::string& settings_hash);
  // Whether a row with the same content, settings, clip id and creation
  // time exists (merge uses it to never copy a row twice).
  enum class Presence { present, absent };
  Expected<Presence> contains(const StoredAnalysis& row);
  // Every row, oldest first.
  Expected<std::vector<StoredAnalysis>> all();

 private:
  ResultStore(sqlite3* db, std::string path) : db_(db), path_(std::move(path)) {}
  Status exec(const char* sql);
  sqlite3* db_;
  std::string path_;
  std::mutex mutex_;  // one connection, used by one thread at a time
};

}  // namespace clipwarden
