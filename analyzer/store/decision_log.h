// People's decisions on clips, kept append-only in the results store file
// (table `decisions`): a new decision on a clip adds a row, the newest row
// of a clip is its current decision, and triggers refuse UPDATE and DELETE.
// Each decision carries the id its client made up for it, so a request sent
// twice (a retry after a lost answer, a server killed before answering) is
// stored once. SQLite's write-ahead log with synchronous=FULL makes every
// acknowledged decision survive a kill of the process at any moment; the
// busy timeout lets several servers and threads write the same file.
#pragma once

#include <cstdint>
#include <memory>
#include <mutex>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "clipwarden/error.h"

struct sqlite3;

namespace clipwarden {

struct Decision {
  int64_t id = 0;           // set by append(): the order decisions were stored in
  std::string request_id;   // made by the client, unique per decision
  std::string clip_id;      // the queue id
  std::string content_sha256;
  std::string reviewer;
  std::string decided_at;   // ISO 8601 UTC with milliseconds, set by append()
  std::string decision;     // "keep", "reject" or "second_look"
  std::vector<std::string> tags;
  std::string note;
  std::string tool_verdict;  // the queue's verdict when the decision was made
  std::vector<std::string> tool_reasons;
};

// The decision words, in the order pages offer them.
const std::vector<std::string>& decision_names();

nlohmann::json decision_to_json(const Decision& d);

class DecisionLog {
 public:
  // Opens or creates the table in the store file at `path`.
  static Expected<std::unique_ptr<DecisionLog>> open(const std::string& path);
  ~DecisionLog();
  DecisionLog(const DecisionLog&) = delete;
  DecisionLog& operator=(const DecisionLog&) = delete;

  // Stores `d` (its id and decided_at are filled in) unless a decision with
  // its request_id is already stored; either way returns the stored one.
  // A bad decision word, an empty clip id or request id is a usage error.
  Expected<Decision> append(Decision d);
  // Every decision, in the order they were stored.
  Expected<std::vector<Decision>> all();

 private:
  DecisionLog(sqlite3* db, std::string path) : db_(db), path_(std::move(path)) {}
  Expected<std::vector<Decision>> select(const std::string& where, const std::string& arg);
  sqlite3* db_;
  std::string path_;
  std::mutex mutex_;
};

// The newest decision of each clip id, keyed by clip id.
std::vector<Decision> latest_decisions(const std::vector<Decision>& all);

}  // namespace clipwarden
