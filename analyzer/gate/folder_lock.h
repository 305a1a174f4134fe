// One writer per output folder. Two gates writing one folder at once each
// rewrite queue.jsonl and index.html from their own results and overwrite
// each other's reports, so links end up pointing at the other run's files.
// A gate (and a merge) therefore holds an advisory lock on DIR/.clipwarden.lock
// (flock, released by the kernel when the process ends, however it ends) for
// as long as it writes; the file names the holder so the second writer can
// say who it is.
#pragma once

#include <string>

#include "clipwarden/error.h"

namespace clipwarden {

class FolderLock {
 public:
  // Takes the lock without waiting. A usage Error naming the folder and the
  // holder ("pid 4242 on host, since 2026-12-04T16:44:00Z") when another
  // process holds it; an output Error when the lock file cannot be made.
  static Expected<FolderLock> take(const std::string& dir);
  // DIR/.clipwarden.lock
  static std::string file_in(const std::string& dir);

  FolderLock(FolderLock&& other) noexcept : fd_(other.fd_) { other.fd_ = -1; }
  FolderLock& operator=(FolderLock&&) = delete;
  FolderLock(const FolderLock&) = delete;
  ~FolderLock();

 private:
  explicit FolderLock(int fd) : fd_(fd) {}
  int fd_;
};

}  // namespace clipwarden
