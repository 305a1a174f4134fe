#include "analyzer/decode/truncation.h"

#include <cstdio>
#include <cstring>
#include <filesystem>

namespace clipwarden::decode {
namespace {

class DiskFile final : public FileBytes {
 public:
  explicit DiskFile(const std::string& path) : file_(std::fopen(path.c_str(), "rb")) {
    std::error_code ec;
    size = std::filesystem::file_size(path, ec);
    if (ec) size = 0;
  }
  ~DiskFile() override {
    if (file_) std::fclose(file_);
  }
  bool ok() const { return file_ != nullptr; }
  std::vector<uint8_t> read_at(uint64_t offset, size_t count) const override {
    std::vector<uint8_t> bytes(count);
    if (fseeko(file_, static_cast<off_t>(offset), SEEK_SET) != 0) return {};
    bytes.resize(std::fread(bytes.data(), 1, count, file_));
    return bytes;
  }

 private:
  std::FILE* file_;
};

uint64_t big_endian(const uint8_t* p, int n) {
  uint64_t v = 0;
  for (int i = 0; i < n; ++i) v = v << 8 | p[i];
  return v;
}
uint64_t little_endian32(const uint8_t* p) {
  return uint64_t{p[0]} | uint64_t{p[1]} << 8 | uint64_t{p[2]} << 16 | uint64_t{p[3]} << 24;
}

std::string ends_early(uint64_t file_size, const std::string& what, uint64_t declared_end) {
  return "the file ends at byte " + std::to_string(file_size) + " but its " + what +
         " runs to byte " + std::to_string(declared_end);
}

// A top-level box type is a four-character code of printable ASCII
// (ISO/IEC 14496-12 section 4.2 and the registered types); anything else
// where a box should start is not a box.
bool printable_type(const uint8_t* p) {
  for (int i = 0; i < 4; ++i)
    if (p[i] < 0x20 || p[i] > 0x7e) return false;
  return true;
}

std::string stray_bytes(uint64_t file_size, uint64_t from) {
  return std::to_string(file_size - from) + " bytes after the last box (from byte " +
         std::to_string(from) + ") are not a box; ignored";
}

// ISO/IEC 14496-12 section 4.2: size (32-bit; 1 = a 64-bit size follows,
// 0 = to the end of the file), then the four-character type. Bytes after
// the last box that do not start a box (too few for a header, or a type
// that is not a four-character code) are stray data some writers leave:
// FFmpeg plays such files whole, so they are a note, not a truncation.
ContainerCheck check_boxes(const FileBytes& file) {
  ContainerCheck out;
  uint64_t offset = 0;
  while (offset < file.size) {
    const auto header = file.read_at(offset, 16);
    if (header.size() < 8 || !printable_type(header.data() + 4)) {
      if (offset > 0) out.trailing = stray_bytes(file.size, offset);
      return out;
    }
    uint64_t size = big_endian(header.data(), 4);
    const std::string type(header.begin() + 4, header.begin() + 8);
    if (size == 1) {
      if (header.size() < 16) {
        out.truncation = ends_early(file.size, type + " box header", offset + 16);
        return out;
      }
      size = big_endian(header.data() + 8, 8);
    }
    if (size == 0) return out;  // runs to the end of the file by definition
    if (size < 8) return out;   // not a box structure we understand: no verdict
    if (offset + size > file.size) {
      out.truncation = ends_early(file.size, type + " box", offset + size);
      return out;
    }
    offset += size;
  }
  return out;
}

// RIFF: "RIFF", 32-bit little-endian size, form type; large AVI files
// continue with further RIFF chunks ("AVIX"). Chunks are padded to even.
std::optional<std::string> check_riff(const FileBytes& file) {
  uint64_t offset = 0;
  while (offset + 8 <= file.size) {
    const auto header = file.read_at(offset, 8);
    if (header.size() < 8 || std::memcmp(header.data(), "RIFF", 4) != 0) break;
    const uint64_t end = offset + 8 + little_endian32(header.data() + 4);
    if (end > file.size) return ends_early(file.size, "RIFF chunk", end);
    offset = end + (end & 1);
  }
  return std::nullopt;
}

// EBML variable-length integer (RFC 8794 section 4): the count of leading
// zero bits of the first byte gives the length. Returns the length in
// bytes, 0 if invalid; `value` without the marker bit, all ones = unknown.
int read_vint(const std::vector<uint8_t>& bytes, size_t at, uint64_t& value, bool& unknown) {
  if (at >= bytes.size() || bytes[at] == 0) return 0;
  int length = 1;
  while (!(bytes[at] & (0x80 >> (length - 1)))) ++length;
  if (at + length > bytes.size()) return 0;
  value = bytes[at] & (0xFF >> length);
  bool all_ones = value == (0xFFu >> length);
  for (int i = 1; i < length; ++i) {
    value = value << 8 | bytes[at + i];
    all_ones = all_ones && bytes[at + i] == 0xFF;
  }
  unknown = all_ones;
  return length;
}

// Matroska: the EBML header element, then the Segment (ID 0x18538067)
// whose declared size must fit in the file (unknown size: no verdict).
std::optional<std::string> check_matroska(const FileBytes& file) {
  const auto bytes = file.read_at(0, 4096);
  size_t at = 4;  // past the EBML ID 1A 45 DF A3
  uint64_t size = 0;
  bool unknown = false;
  int n = read_vint(bytes, at, size, unknown);
  if (!n || unknown) return std::nullopt;
  at += n + size;
  if (at + 4 > bytes.size() || big_endian(bytes.data() + at, 4) != 0x18538067) return std::nullopt;
  at += 4;
  n = read_vint(bytes, at, size, unknown);
  if (!n || unknown) return std::nullopt;
  const uint64_t end = at + n + size;
  if (end > file.size) return ends_early(file.size, "Segment", end);
  return std::nullopt;
}

std::optional<std::string> check_gif(const FileBytes& file) {
  const auto last = file.read_at(file.size - 1, 1);
  if (last.size() == 1 && last[0] == 0x3B) return std::nullopt;
  return "the file ends before the GIF trailer";
}

bool is_box_type(const uint8_t* p) {
  static const char* kTypes[] = {"ftyp", "moov", "mdat", "free", "wide", "skip", "pnot", "styp"};
  for (const char* t : kTypes)
    if (std::memcmp(p, t, 4) == 0) return true;
  return false;
}

}  // namespace

ContainerCheck check_container(const FileBytes& file) {
  const auto head = file.read_at(0, 12);
  if (head.size() < 12) return {};
  if (std::memcmp(head.data(), "RIFF", 4) == 0) return {check_riff(file), std::nullopt};
  if (big_endian(head.data(), 4) == 0x1A45DFA3) return {check_matroska(file), std::nullopt};
  if (std::memcmp(head.data(), "GIF8", 4) == 0) return {check_gif(file), std::nullopt};
  if (is_box_type(head.data() + 4)) return check_boxes(file);
  return {};
}

ContainerCheck check_container(const std::string& path) {
  DiskFile file(path);
  if (!file.ok()) return {};
  return check_container(file);
}

std::optional<std::string> find_truncation(const FileBytes& file) {
  return check_container(file).truncation;
}

std::optional<std::string> find_truncation(const std::string& path) {
  return check_container(path).truncation;
}

}  // namespace clipwarden::decode
