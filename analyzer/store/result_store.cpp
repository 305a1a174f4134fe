// The results store on SQLite. WAL mode lets readers and one writer work at
// once (other processes too); the busy timeout makes a writer wait for
// another process's transaction instead of failing; BEGIN IMMEDIATE takes the
// write lock up front so two writers never deadlock upgrading a read lock.
#include <signal.h>
#include <sqlite3.h>
#include <unistd.h>

#include <cerrno>
#include <chrono>
#include <thread>

#include "analyzer/core/byte_text.h"
#include "analyzer/store/sqlite_setup.h"
#include "analyzer/store/result_store.h"

namespace clipwarden {
namespace {

constexpr int kBusyTimeoutMs = 60000;
constexpr int kSchemaVersion = 1;

const char* kSchema = R"sql(
CREATE TABLE IF NOT EXISTS analyses (
  row_id         INTEGER PRIMARY KEY,
  content_sha256 TEXT NOT NULL,
  settings_hash  TEXT NOT NULL,
  tool_version   TEXT NOT NULL,
  clip_id        TEXT NOT NULL,
  clip_path      TEXT NOT NULL,
  model          TEXT NOT NULL,
  prompt_id      TEXT NOT NULL,
  verdict        TEXT NOT NULL CHECK (verdict IN ('pass', 'review', 'reject')),
  coherence      REAL,
  reasons_json   TEXT NOT NULL,
  summary_json   TEXT NOT NULL,
  report_path    TEXT NOT NULL,
  created_at     TEXT NOT NULL
);
CREATE INDEX IF NOT EXISTS analyses_by_key ON analyses (content_sha256, settings_hash);
CREATE TABLE IF NOT EXISTS claims (
  content_sha256 TEXT NOT NULL,
  settings_hash  TEXT NOT NULL,
  owner          TEXT NOT NULL,
  claimed_at     TEXT NOT NULL,
  PRIMARY KEY (content_sha256, settings_hash)
);
)sql";

const char* kColumns =
    "row_id, content_sha256, settings_hash, tool_version, clip_id, clip_path, model, prompt_id, "
    "verdict, coherence, reasons_json, summary_json, report_path, created_at";

// A prepared statement, finalized on scope exit.
class Statement {
 public:
  Statement(sqlite3* db, const std::string& sql) {
    rc_ = sqlite3_prepare_v2(db, sql.c_str(), -1, &stmt_, nullptr);
  }
  ~Statement() { sqlite3_finalize(stmt_); }
  bool ok() const { return rc_ == SQLITE_OK; }
  sqlite3_stmt* get() { return stmt_; }
  void text(int i, const std::string& s) {
    sqlite3_bind_text(stmt_, i, s.data(), static_cast<int>(s.size()), SQLITE_TRANSIENT);
  }
  void real(int i, double v) { sqlite3_bind_double(stmt_, i, v); }

 private:
  sqlite3_stmt* stmt_ = nullptr;
  int rc_;
};

std::string column_text(sqlite3_stmt* s, int i) {
  const unsigned char* t = sqlite3_column_text(s, i);
  return t ? reinterpret_cast<const char*>(t) : "";
}

// "HOST PID": who holds a claim.
std::string this_process() {
  char host[256] = "";
  ::gethostname(host, sizeof host - 1);
  return std::string(host) + " " + std::to_string(::getpid());
}

// A claim by a process that has ended (killed mid-analysis) is void. A
// claim from another machine cannot be checked and is taken as live (a
// store is not to be shared across machines: docs/gate.md).
bool owner_alive(const std::string& owner) {
  const std::string me = this_process();
  const size_t space = owner.rfind(' ');
  if (space == std::string::npos || owner.substr(0, space) != me.substr(0, me.rfind(' ')))
    return space != std::string::npos;
  const long pid = std::strtol(owner.c_str() + space + 1, nullptr, 10);
  return pid > 0 && (::kill(static_cast<pid_t>(pid), 0) == 0 || errno == EPERM);
}

Verdict verdict_from(const std::string& s) {
  return s == "reject" ? Verdict::reject : s == "review" ? Verdict::review : Verdict::pass;
}

StoredAnalysis read_row(sqlite3_stmt* s) {
  StoredAnalysis r;
  r.row_id = sqlite3_column_int64(s, 0);
  r.content_sha256 = column_text(s, 1);
  r.settings_hash = column_text(s, 2);
  r.tool_version = column_text(s, 3);
  r.clip_id = column_text(s, 4);
  r.clip_path = column_text(s, 5);
  r.model = column_text(s, 6);
  r.prompt_id = column_text(s, 7);
  r.verdict = verdict_from(column_text(s, 8));
  r.coherence = sqlite3_column_double(s, 9);
  auto reasons = nlohmann::json::parse(column_text(s, 10), nullptr, false);
  if (reasons.is_array())
    for (const auto& x : reasons)
      if (x.is_string()) r.reasons.push_back(x.get<std::string>());
  r.summary = nlohmann::json::parse(column_text(s, 11), nullptr, false);
  if (r.summary.is_discarded()) r.summary = nlohmann::json::object();
  r.report_path = column_text(s, 12);
  r.created_at = column_text(s, 13);
  return r;
}

}  // namespace

Expected<std::unique_ptr<ResultStore>> ResultStore::open(const std::string& path) {
  sqlite3* db = nullptr;
  const int flags = SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE | SQLITE_OPEN_NOMUTEX;
  if (sqlite3_open_v2(path.c_str(), &db, flags, nullptr) != SQLITE_OK) {
    std::string cause = db ? sqlite3_errmsg(db) : "out of memory";
    sqlite3_close(db);
    return output_error(path, "cannot open results store: " + cause);
  }
  std::unique_ptr<ResultStore> store(new ResultStore(db, path));
  sqlite3_busy_timeout(db, kBusyTimeoutMs);
  // journal_mode returns a row; exec ignores it. synchronous=NORMAL is safe
  // in WAL mode: a power cut may lose the last commits, never corrupt.
  if (auto st = run_store_setup(db, path, {"PRAGMA journal_mode=WAL", "PRAGMA synchronous=NORMAL", kSchema},
                                 "results store");
      !st)
    return st.error();
  Statement version(db, "PRAGMA user_version");
  int found = version.ok() && sqlite3_step(version.get()) == SQLITE_ROW
                  ? sqlite3_column_int(version.get(), 0)
                  : 0;
  if (found > kSchemaVersion)
    return output_error(path, "results store was written by a newer clipwarden (schema " +
                                  std::to_string(found) + ")");
  if (found < kSchemaVersion) {
    auto st = store->exec(("PRAGMA user_version=" + std::to_string(kSchemaVersion)).c_str());
    if (!st) return st.error();
  }
  return store;
}

ResultStore::~ResultStore() { sqlite3_close(db_); }

Status ResultStore::exec(const char* sql) {
  char* message = nullptr;
  if (sqlite3_exec(db_, sql, nullptr, nullptr, &message) != SQLITE_OK) {
    std::string cause = message ? message : sqlite3_errmsg(db_);
    sqlite3_free(message);
    return output_error(path_, "results store: " + cause);
  }
  return Ok{};
}

Expected<std::optional<StoredAnalysis>> ResultStore::find(const std::string& content_sha256,
                                                          const std::string& settings_hash) {
  std::lock_guard lock(mutex_);
  Statement s(db_, std::string("SELECT ") + kColumns +
                       " FROM analyses WHERE content_sha256 = ?1 AND settings_hash = ?2"
                       " ORDER BY row_id DESC LIMIT 1");
  if (!s.ok()) return output_error(path_, std::string("results store: ") + sqlite3_errmsg(db_));
  s.text(1, content_sha256);
  s.text(2, settings_hash);
  const int rc = sqlite3_step(s.get());
  if (rc == SQLITE_ROW) return std::optional<StoredAnalysis>(read_row(s.get()));
  if (rc == SQLITE_DONE) return std::optional<StoredAnalysis>();
  return output_error(path_, std::string("results store: ") + sqlite3_errmsg(db_));
}

Expected<ResultStore::Claim> ResultStore::claim(const std::string& content_sha256,
                                                const std::string& settings_hash) {
  std::lock_guard lock(mutex_);
  auto begun = exec("BEGIN IMMEDIATE");
  if (!begun) return begun.error();
  const auto fail = [&]() -> Error {
    std::string cause = sqlite3_errmsg(db_);
    (void)exec("ROLLBACK");
    return output_error(path_, "results store: cannot claim a clip: " + cause);
  };
  Statement held(db_, "SELECT owner FROM claims WHERE content_sha256 = ?1 AND settings_hash = ?2");
  if (!held.ok()) return fail();
  held.text(1, content_sha256);
  held.text(2, settings_hash);
  const int rc = sqlite3_step(held.get());
  if (rc != SQLITE_ROW && rc != SQLITE_DONE) return fail();
  if (rc == SQLITE_ROW && owner_alive(column_text(held.get(), 0))) {
    if (auto st = exec("COMMIT"); !st) return st.error();
    return Claim::held_elsewhere;
  }
  // Stored since the caller looked (its writer inserted, then released the
  // claim): nothing to claim, the caller takes the row.
  Statement stored(db_,
                   "SELECT 1 FROM analyses WHERE content_sha256 = ?1 AND settings_hash = ?2 LIMIT 1");
  if (!stored.ok()) return fail();
  stored.text(1, content_sha256);
  stored.text(2, settings_hash);
  const int found = sqlite3_step(stored.get());
  if (found != SQLITE_ROW && found != SQLITE_DONE) return fail();
  if (found == SQLITE_ROW) {
    if (auto st = exec("COMMIT"); !st) return st.error();
    return Claim::held_elsewhere;
  }
  Statement take(db_,
                 "INSERT OR REPLACE INTO claims (content_sha256, settings_hash, owner, claimed_at) "
                 "VALUES (?1, ?2, ?3, strftime('%Y-%m-%dT%H:%M:%fZ', 'now'))");
  if (!take.ok()) return fail();
  take.text(1, content_sha256);
  take.text(2, settings_hash);
  take.text(3, this_process());
  if (sqlite3_step(take.get()) != SQLITE_DONE) return fail();
  if (auto st = exec("COMMIT"); !st) return st.error();
  return Claim::taken;
}

Status ResultStore::release(const std::string& content_sha256, const std::string& settings_hash) {
  std::lock_guard lock(mutex_);
  Statement s(db_,
              "DELETE FROM claims WHERE content_sha256 = ?1 AND settings_hash = ?2 AND owner = ?3");
  if (!s.ok()) return output_error(path_, std::string("results store: ") + sqlite3_errmsg(db_));
  s.text(1, content_sha256);
  s.text(2, settings_hash);
  s.text(3, this_process());
  if (sqlite3_step(s.get()) != SQLITE_DONE)
    return output_error(path_, std::string("results store: cannot release a claim: ") +
                                   sqlite3_errmsg(db_));
  return Ok{};
}

Status ResultStore::insert(StoredAnalysis& row) {
  std::lock_guard lock(mutex_);
  auto begun = exec("BEGIN IMMEDIATE");
  if (!begun) return begun;
  // The same clip (content, settings and id) is stored once: a newer
  // analysis (e.g. after its stored report was deleted) replaces the row.
  Statement same(db_,
                 "DELETE FROM analyses WHERE content_sha256 = ?1 AND settings_hash = ?2 AND "
                 "clip_id = ?3");
  bool ok = same.ok();
  if (ok) {
    same.text(1, row.content_sha256);
    same.text(2, row.settings_hash);
    same.text(3, row.clip_id);
    ok = sqlite3_step(same.get()) == SQLITE_DONE;
  }
  Statement s(
      db_,
      "INSERT INTO analyses (content_sha256, settings_hash, tool_version, clip_id, clip_path, "
      "model, prompt_id, verdict, coherence, reasons_json, summary_json, report_path, created_at) "
      "VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8, ?9, ?10, ?11, ?12, "
      "COALESCE(NULLIF(?13, ''), strftime('%Y-%m-%dT%H:%M:%fZ', 'now'))) "
      "RETURNING row_id, created_at");
  ok = ok && s.ok();
  if (ok) {
    s.text(1, row.content_sha256);
    s.text(2, row.settings_hash);
    s.text(3, row.tool_version);
    s.text(4, row.clip_id);
    s.text(5, row.clip_path);
    s.text(6, row.model);
    s.text(7, row.prompt_id);
    s.text(8, to_string(row.verdict));
    s.real(9, row.coherence);
    s.text(10, dump_json(nlohmann::json(row.reasons)));
    s.text(11, dump_json(row.summary));
    s.text(12, row.report_path);
    s.text(13, row.created_at);
    ok = sqlite3_step(s.get()) == SQLITE_ROW;
    if (ok) {
      row.row_id = sqlite3_column_int64(s.get(), 0);
      row.created_at = column_text(s.get(), 1);
      ok = sqlite3_step(s.get()) == SQLITE_DONE;
    }
  }
  if (!ok) {
    std::string cause = sqlite3_errmsg(db_);
    (void)exec("ROLLBACK");
    return output_error(path_, "results store: cannot insert: " + cause);
  }
  return exec("COMMIT");
}

Expected<ResultStore::Presence> ResultStore::contains(const StoredAnalysis& row) {
  std::lock_guard lock(mutex_);
  Statement s(
      db_,
      "SELECT 1 FROM analyses WHERE content_sha256 = ?1 AND settings_hash = ?2 AND clip_id = ?3 "
      "AND created_at = ?4 LIMIT 1");
  if (!s.ok()) return output_error(path_, std::string("results store: ") + sqlite3_errmsg(db_));
  s.text(1, row.content_sha256);
  s.text(2, row.settings_hash);
  s.text(3, row.clip_id);
  s.text(4, row.created_at);
  const int rc = sqlite3_step(s.get());
  if (rc == SQLITE_ROW) return Presence::present;
  if (rc == SQLITE_DONE) return Presence::absent;
  return output_error(path_, std::string("results store: ") + sqlite3_errmsg(db_));
}

Expected<std::vector<StoredAnalysis>> ResultStore::all() {
  std::lock_guard lock(mutex_);
  Statement s(db_, std::string("SELECT ") + kColumns + " FROM analyses ORDER BY row_id");
  if (!s.ok()) return output_error(path_, std::string("results store: ") + sqlite3_errmsg(db_));
  std::vector<StoredAnalysis> rows;
  int rc;
  while ((rc = sqlite3_step(s.get())) == SQLITE_ROW) rows.push_back(read_row(s.get()));
  if (rc != SQLITE_DONE)
    return output_error(path_, std::string("results store: ") + sqlite3_errmsg(db_));
  return rows;
}

}  // namespace clipwarden
