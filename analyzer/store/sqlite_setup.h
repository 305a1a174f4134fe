#pragma once
// Setting up a connection to a results store file, shared by the analyses
// table and the decision log: both open the same file from several
// processes at once.
#include <sqlite3.h>

#include <initializer_list>
#include <string>

#include "clipwarden/error.h"

namespace clipwarden {

// Runs `statements` (pragmas, schema) on `db`. Two processes opening a new
// store at the same moment: switching to WAL takes an exclusive lock SQLite
// does not wait for (no busy handler), so the loser retries, for at most
// 5 s. A file that is not a database gets a message saying how to move it
// aside. `what` names the part being prepared in messages.
Status run_store_setup(sqlite3* db, const std::string& path,
                       std::initializer_list<const char*> statements, const std::string& what);

}  // namespace clipwarden
