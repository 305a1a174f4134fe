// Atomic file replacement: write a sibling temporary file, fsync, rename.
#include <fcntl.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <filesystem>
#include <random>

#include "analyzer/core/byte_text.h"
#include "clipwarden/report_io.h"

namespace clipwarden {

Status write_file_atomic(const std::string& path, const std::string& content) {
  namespace fs = std::filesystem;
  const fs::path target(path);
  std::random_device rd;
  // ".tmp-NAME-PID-N": hidden, never matched by a reader's extension, and the
  // PID lets the gate remove what a killed process left (run_gate.cpp).
  const fs::path tmp = target.parent_path() /
                       (".tmp-" + target.filename().string() + "-" + std::to_string(::getpid()) +
                        "-" + std::to_string(rd()));
  int fd = ::open(tmp.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0644);
  if (fd < 0) return output_error(path, std::string("cannot create: ") + std::strerror(errno));
  size_t written = 0;
  while (written < content.size()) {
    ssize_t n = ::write(fd, content.data() + written, content.size() - written);
    if (n < 0 && errno == EINTR) continue;
    if (n <= 0) {
      int err = errno;
      ::close(fd);
      ::unlink(tmp.c_str());
      return output_error(path, std::string("cannot write: ") + std::strerror(err));
    }
    written += static_cast<size_t>(n);
  }
  if (::fsync(fd) != 0 || ::close(fd) != 0) {
    ::unlink(tmp.c_str());
    return output_error(path, "cannot flush to disk");
  }
  if (::rename(tmp.c_str(), target.c_str()) != 0) {
    int err = errno;
    ::unlink(tmp.c_str());
    return output_error(path, std::string("cannot rename into place: ") + std::strerror(err));
  }
  return Ok{};
}

Status write_json_report(const Report& report, const std::string& path) {
  return write_file_atomic(path, dump_json(report_to_json(report), 1) + "\n");
}

}  // namespace clipwarden
