// Spotting a cut-off file from its container's own size fields. Demuxers
// tend to stop quietly at a short file, so a truncated clip would otherwise
// pass as a shorter one. Checked: ISO BMFF (MP4/MOV: every top-level box
// fits in the file), RIFF (AVI/WAV: every top-level chunk fits), Matroska/
// WebM (the Segment's declared size fits) and GIF (the file ends with the
// trailer byte 0x3B, which GIF89a requires). Other containers: no verdict.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

namespace clipwarden::decode {

struct FileBytes;

// What the container's own sizes say: `truncation` why the file looks cut
// short; `trailing` a note when bytes after an MP4/MOV's last box are not a
// box (stray data, not a reason to refuse the file).
struct ContainerCheck {
  std::optional<std::string> truncation;
  std::optional<std::string> trailing;
};
ContainerCheck check_container(const std::string& path);
ContainerCheck check_container(const FileBytes& file);

// Why the file looks truncated ("the file ends at byte 1000 but its mdat
// box runs to byte 5000"), or nothing when it looks whole or the container
// is not one of the above.
std::optional<std::string> find_truncation(const std::string& path);

// The same check on any byte source (files, or memory in tests).
struct FileBytes {
  uint64_t size = 0;
  // Reads up to `count` bytes at `offset`; returns fewer at the end.
  virtual std::vector<uint8_t> read_at(uint64_t offset, size_t count) const = 0;
  virtual ~FileBytes() = default;
};
std::optional<std::string> find_truncation(const FileBytes& file);

}  // namespace clipwarden::decode
