#include "analyzer/store/sqlite_setup.h"

#include <chrono>
#include <thread>

namespace clipwarden {
namespace {

// sqlite3_exec's own message when it gave one, else the connection's.
int exec_once(sqlite3* db, const char* sql, std::string& cause) {
  char* message = nullptr;
  const int rc = sqlite3_exec(db, sql, nullptr, nullptr, &message);
  if (rc != SQLITE_OK) cause = message ? message : sqlite3_errmsg(db);
  sqlite3_free(message);
  return rc;
}

}  // namespace

Status run_store_setup(sqlite3* db, const std::string& path,
                       std::initializer_list<const char*> statements, const std::string& what) {
  for (const char* sql : statements) {
    std::string cause;
    int rc = exec_once(db, sql, cause);
    for (int attempt = 0; rc != SQLITE_OK && attempt < 50; ++attempt) {
      const int busy = sqlite3_errcode(db);
      if (busy != SQLITE_BUSY && busy != SQLITE_LOCKED) break;
      std::this_thread::sleep_for(std::chrono::milliseconds(100));
      rc = exec_once(db, sql, cause);
    }
    if (rc == SQLITE_OK) continue;
    const int code = sqlite3_errcode(db);
    if (code == SQLITE_NOTADB || code == SQLITE_CORRUPT)
      return output_error(path, "results store is damaged (" + std::string(sqlite3_errmsg(db)) +
                                    "); move it aside (mv " + path + " " + path +
                                    ".damaged) or point --db at another file");
    return output_error(path, what + ": " + cause);
  }
  return Ok{};
}

}  // namespace clipwarden
