#include "analyzer/gate/folder_lock.h"

#include <fcntl.h>
#include <sys/file.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <ctime>
#include <filesystem>

namespace clipwarden {
namespace {

std::string holder_text() {
  char host[256] = "";
  ::gethostname(host, sizeof host - 1);
  char when[32] = "";
  const std::time_t now = std::time(nullptr);
  std::tm utc{};
  ::gmtime_r(&now, &utc);
  std::strftime(when, sizeof when, "%Y-%m-%dT%H:%M:%SZ", &utc);
  return "pid " + std::to_string(::getpid()) + " on " + host + ", since " + when;
}

std::string read_holder(int fd) {
  char buf[512];
  const ssize_t n = ::pread(fd, buf, sizeof buf - 1, 0);
  std::string text(buf, n > 0 ? static_cast<size_t>(n) : 0);
  while (!text.empty() && (text.back() == '\n' || text.back() == '\0')) text.pop_back();
  return text.empty() ? "a process that has not said who it is" : text;
}

}  // namespace

std::string FolderLock::file_in(const std::string& dir) {
  return (std::filesystem::path(dir) / ".clipwarden.lock").string();
}

Expected<FolderLock> FolderLock::take(const std::string& dir) {
  const std::string path = file_in(dir);
  const int fd = ::open(path.c_str(), O_RDWR | O_CREAT | O_CLOEXEC, 0644);
  if (fd < 0)
    return output_error(
        dir, std::string("cannot create the folder's lock file: ") + std::strerror(errno));
  if (::flock(fd, LOCK_EX | LOCK_NB) != 0) {
    const int err = errno;
    std::string cause = err == EWOULDBLOCK
                            ? "is being written by another clipwarden (" + read_holder(fd) +
                                  "); wait for it to finish or write to another folder"
                            : std::string("cannot lock the folder: ") + std::strerror(err);
    ::close(fd);
    return usage_error(dir, cause);
  }
  const std::string holder = holder_text() + "\n";
  if (::ftruncate(fd, 0) != 0 || ::pwrite(fd, holder.data(), holder.size(), 0) < 0) {
    // The lock holds without the note; only the second writer's message is poorer.
  }
  return FolderLock(fd);
}

FolderLock::~FolderLock() {
  if (fd_ >= 0) ::close(fd_);  // closing the last descriptor releases the flock
}

}  // namespace clipwarden
