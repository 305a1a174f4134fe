#include "analyzer/store/decision_log.h"

#include "analyzer/core/byte_text.h"
#include "analyzer/store/sqlite_setup.h"

#include <sqlite3.h>

#include <algorithm>
#include <chrono>
#include <ctime>
#include <map>

namespace clipwarden {
namespace {

constexpr int kDecisionBusyTimeoutMs = 60000;

const char* kDecisionSchema = R"sql(
CREATE TABLE IF NOT EXISTS decisions (
  id                INTEGER PRIMARY KEY AUTOINCREMENT,
  request_id        TEXT NOT NULL UNIQUE,
  clip_id           TEXT NOT NULL,
  content_sha256    TEXT NOT NULL,
  reviewer          TEXT NOT NULL,
  decided_at        TEXT NOT NULL,
  decision          TEXT NOT NULL CHECK (decision IN ('keep', 'reject', 'second_look')),
  tags_json         TEXT NOT NULL,
  note              TEXT NOT NULL,
  tool_verdict      TEXT NOT NULL,
  tool_reasons_json TEXT NOT NULL
);
CREATE INDEX IF NOT EXISTS decisions_by_clip ON decisions (clip_id, id);
CREATE TRIGGER IF NOT EXISTS decisions_no_update BEFORE UPDATE ON decisions
  BEGIN SELECT RAISE(ABORT, 'decisions are append-only'); END;
CREATE TRIGGER IF NOT EXISTS decisions_no_delete BEFORE DELETE ON decisions
  BEGIN SELECT RAISE(ABORT, 'decisions are append-only'); END;
)sql";

const char* kDecisionColumns =
    "id, request_id, clip_id, content_sha256, reviewer, decided_at, decision, tags_json, note, "
    "tool_verdict, tool_reasons_json";

std::string now_iso_ms() {
  const auto now = std::chrono::system_clock::now();
  const auto ms = std::chrono::duration_cast<std::chrono::milliseconds>(now.time_since_epoch()).count();
  const std::time_t secs = static_cast<std::time_t>(ms / 1000);
  std::tm tm{};
  gmtime_r(&secs, &tm);
  char buf[96];
  std::snprintf(buf, sizeof buf, "%04d-%02d-%02dT%02d:%02d:%02d.%03dZ", tm.tm_year + 1900,
                tm.tm_mon + 1, tm.tm_mday, tm.tm_hour, tm.tm_min, tm.tm_sec, static_cast<int>(ms % 1000));
  return buf;
}

std::vector<std::string> strings_from(const std::string& json_text) {
  std::vector<std::string> out;
  auto j = nlohmann::json::parse(json_text, nullptr, false);
  if (j.is_array())
    for (const auto& s : j)
      if (s.is_string()) out.push_back(s.get<std::string>());
  return out;
}

std::string text_at(sqlite3_stmt* s, int i) {
  const unsigned char* t = sqlite3_column_text(s, i);
  return t ? reinterpret_cast<const char*>(t) : "";
}

// One statement's life: prepared, bound, stepped, finalized on scope exit.
struct Prepared {
  sqlite3_stmt* stmt = nullptr;
  Prepared(sqlite3* db, const char* sql) { sqlite3_prepare_v2(db, sql, -1, &stmt, nullptr); }
  ~Prepared() { sqlite3_finalize(stmt); }
  void bind(int i, const std::string& v) {
    sqlite3_bind_text(stmt, i, v.data(), static_cast<int>(v.size()), SQLITE_TRANSIENT);
  }
};

}  // namespace

const std::vector<std::string>& decision_names() {
  static const std::vector<std::string> names = {"keep", "reject", "second_look"};
  return names;
}

nlohmann::json decision_to_json(const Decision& d) {
  return {{"id", d.id},
          {"request_id", d.request_id},
          {"clip_id", d.clip_id},
          {"sha256", d.content_sha256},
          {"reviewer", d.reviewer},
          {"decided_at", d.decided_at},
          {"decision", d.decision},
          {"tags", d.tags},
          {"note", d.note},
          {"tool_verdict", d.tool_verdict},
          {"tool_reasons", d.tool_reasons}};
}

Expected<std::unique_ptr<DecisionLog>> DecisionLog::open(const std::string& path) {
  sqlite3* db = nullptr;
  if (sqlite3_open_v2(path.c_str(), &db, SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE | SQLITE_OPEN_FULLMUTEX,
                      nullptr) != SQLITE_OK) {
    std::string cause = db ? sqlite3_errmsg(db) : "cannot open";
    sqlite3_close(db);
    return output_error(path, "cannot open the results store: " + cause);
  }
  sqlite3_busy_timeout(db, kDecisionBusyTimeoutMs);
  // WAL: a committed decision is in the log file before append() returns;
  // FULL syncs the log at each commit, so not even a power cut loses it.
  if (auto st = run_store_setup(db, path, {"PRAGMA journal_mode=WAL", "PRAGMA synchronous=FULL", kDecisionSchema},
                                 "cannot prepare the decisions table");
      !st) {
    sqlite3_close(db);
    return st.error();
  }
  return std::unique_ptr<DecisionLog>(new DecisionLog(db, path));
}

DecisionLog::~DecisionLog() { sqlite3_close(db_); }

Expected<std::vector<Decision>> DecisionLog::select(const std::string& where, const std::string& arg) {
  const std::string sql = std::string("SELECT ") + kDecisionColumns + " FROM decisions " + where + " ORDER BY id";
  Prepared q(db_, sql.c_str());
  if (!q.stmt) return output_error(path_, std::string("cannot read decisions: ") + sqlite3_errmsg(db_));
  if (!arg.empty()) q.bind(1, arg);
  std::vector<Decision> out;
  int rc;
  while ((rc = sqlite3_step(q.stmt)) == SQLITE_ROW) {
    Decision d;
    d.id = sqlite3_column_int64(q.stmt, 0);
    d.request_id = text_at(q.stmt, 1);
    d.clip_id = text_at(q.stmt, 2);
    d.content_sha256 = text_at(q.stmt, 3);
    d.reviewer = text_at(q.stmt, 4);
    d.decided_at = text_at(q.stmt, 5);
    d.decision = text_at(q.stmt, 6);
    d.tags = strings_from(text_at(q.stmt, 7));
    d.note = text_at(q.stmt, 8);
    d.tool_verdict = text_at(q.stmt, 9);
    d.tool_reasons = strings_from(text_at(q.stmt, 10));
    out.push_back(std::move(d));
  }
  if (rc != SQLITE_DONE) return output_error(path_, std::string("cannot read decisions: ") + sqlite3_errmsg(db_));
  return out;
}

Expected<std::vector<Decision>> DecisionLog::all() {
  std::lock_guard<std::mutex> lock(mutex_);
  return select("", "");
}

Expected<Decision> DecisionLog::append(Decision d) {
  const auto& names = decision_names();
  if (std::find(names.begin(), names.end(), d.decision) == names.end())
    return usage_error("decision", "'" + d.decision + "' is not one of keep, reject, second_look");
  if (d.clip_id.empty()) return usage_error("clip_id", "no clip named");
  if (d.request_id.empty()) return usage_error("request_id", "a decision needs the id its client gave it");
  std::lock_guard<std::mutex> lock(mutex_);
  d.decided_at = now_iso_ms();
  {
    // ON CONFLICT DO NOTHING: a request id seen before keeps its first row.
    Prepared q(db_,
               "INSERT INTO decisions (request_id, clip_id, content_sha256, reviewer, decided_at, "
               "decision, tags_json, note, tool_verdict, tool_reasons_json) "
               "VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8, ?9, ?10) ON CONFLICT (request_id) DO NOTHING");
    if (!q.stmt) return output_error(path_, std::string("cannot store a decision: ") + sqlite3_errmsg(db_));
    q.bind(1, d.request_id);
    q.bind(2, d.clip_id);
    q.bind(3, d.content_sha256);
    q.bind(4, d.reviewer);
    q.bind(5, d.decided_at);
    q.bind(6, d.decision);
    q.bind(7, dump_json(nlohmann::json(d.tags)));
    q.bind(8, d.note);
    q.bind(9, d.tool_verdict);
    q.bind(10, dump_json(nlohmann::json(d.tool_reasons)));
    if (sqlite3_step(q.stmt) != SQLITE_DONE)
      return output_error(path_, std::string("cannot store a decision: ") + sqlite3_errmsg(db_));
  }
  auto stored = select("WHERE request_id = ?1", d.request_id);
  if (!stored) return stored.error();
  if (stored->empty()) return output_error(path_, "a stored decision could not be read back");
  return stored->front();
}

std::vector<Decision> latest_decisions(const std::vector<Decision>& all) {
  std::map<std::string, const Decision*> newest;
  for (const auto& d : all) {
    auto& slot = newest[d.clip_id];
    if (!slot || d.id > slot->id) slot = &d;
  }
  std::vector<Decision> out;
  for (const auto& [id, d] : newest) out.push_back(*d);
  return out;
}

}  // namespace clipwarden
