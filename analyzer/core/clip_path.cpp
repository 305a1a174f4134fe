// The one input check every entry point makes before opening a clip
// (declared in clipwarden/clip_source.h). It lives in the base layer so the
// store, which hashes clips, makes the same check as the decoder.
#include <filesystem>

#include "clipwarden/clip_source.h"

namespace clipwarden {
namespace {

const char* kind_of(std::filesystem::file_type type) {
  using std::filesystem::file_type;
  switch (type) {
    case file_type::block:
      return "a block device";
    case file_type::character:
      return "a character device";
    case file_type::fifo:
      return "a named pipe";
    case file_type::socket:
      return "a socket";
    default:
      return "not a regular file";
  }
}

}  // namespace

Status check_clip_path(const std::string& path) {
  namespace fs = std::filesystem;
  std::error_code ec;
  const auto status = fs::status(path, ec);  // follows links: the target is what is read
  if (!fs::exists(status)) {
    if (fs::is_symlink(fs::symlink_status(path, ec)))
      return input_error(path, "dangling symbolic link");
    return input_error(path, "no such file or folder");
  }
  if (fs::is_regular_file(status) || fs::is_directory(status)) return Ok{};
  return input_error(path, std::string("not a regular file or a folder of frames (") +
                               kind_of(status.type()) + ")");
}

}  // namespace clipwarden
