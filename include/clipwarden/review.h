// The review station: a small local web app over a gate output folder
// (its queue.jsonl, reports and results store) where people watch the
// flagged clips and decide on each. It listens on 127.0.0.1 unless told
// otherwise, and every request must carry the random access token the
// server prints; docs/review.md states what is served and what is refused.
#pragma once

#include <memory>
#include <string>

#include "clipwarden/error.h"

namespace clipwarden {

struct ReviewOptions {
  std::string dir;                 // the gate output folder (holds queue.jsonl)
  std::string db_path;             // "" = dir/clipwarden.db
  std::string host = "127.0.0.1";  // the address to listen on
  int port = 8765;                 // 0 = any free port
  std::string token;               // "" = a fresh random token
  std::string reviewer;            // who decides when a request names nobody
};

class ReviewServer {
 public:
  // Reads the folder's queue and binds the port. Errors name the folder,
  // the file or the address.
  static Expected<std::unique_ptr<ReviewServer>> open(const ReviewOptions& options);
  virtual ~ReviewServer() = default;

  virtual int port() const = 0;
  virtual const std::string& token() const = 0;
  // The address to open, token included.
  virtual std::string url() const = 0;

  // Serves until stop() is called (from any thread).
  virtual Status run() = 0;
  virtual void stop() = 0;
};

// Writes every decision stored in the results store at `db_path` to
// `out_path`, one JSON object per line in the order they were made (fields
// in docs/review.md); returns how many. "-" writes to stdout.
Expected<int> export_decisions(const std::string& db_path, const std::string& out_path);

// True for the loopback addresses (127.0.0.0/8, ::1, localhost): any other
// listening address exposes the queue to the network.
bool is_loopback_host(const std::string& host);

}  // namespace clipwarden
