#include "analyzer/cli/output_names.h"

#include <filesystem>

#include "analyzer/core/byte_text.h"

namespace clipwarden::cli {
namespace {

// UTF-8 of the Unicode bidirectional controls at `i`: U+200E/U+200F marks,
// U+202A..U+202E embeddings and overrides, U+2066..U+2069 isolates (Unicode
// UAX #9). An override in a file name makes "x\u202Egnp.exe" show as
// "xexe.png".
bool is_bidi_control(const std::string& s, size_t i) {
  if (i + 2 >= s.size() || static_cast<unsigned char>(s[i]) != 0xE2) return false;
  const auto b1 = static_cast<unsigned char>(s[i + 1]), b2 = static_cast<unsigned char>(s[i + 2]);
  if (b1 == 0x80) return b2 == 0x8E || b2 == 0x8F || (b2 >= 0xAA && b2 <= 0xAE);
  if (b1 == 0x81) return b2 >= 0xA6 && b2 <= 0xA9;
  return false;
}

}  // namespace

std::string safe_stem(const std::string& clip_path) {
  std::filesystem::path p(clip_path);
  std::string stem = p.has_stem() ? p.stem().string() : p.filename().string();
  if (stem.empty() || stem == "." || stem == "..") stem = p.parent_path().filename().string();
  // Output names are always UTF-8 (they go into JSON and pages as they
  // are): non-ASCII characters are kept whole, a byte that is not part of a
  // well-formed UTF-8 sequence becomes '_', and the length limit cuts
  // between characters, never inside one.
  constexpr size_t kMaxBytes = 120;
  std::string out;
  for (size_t i = 0; i < stem.size();) {
    const unsigned char c = static_cast<unsigned char>(stem[i]);
    size_t n = utf8_sequence_length(stem, i);
    std::string piece;
    if (is_bidi_control(stem, i)) {  // a name that reads backwards in a file list
      piece = "_";
    } else if (n > 1) {
      piece = stem.substr(i, n);
    } else {
      const bool keep = (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') ||
                        (c >= '0' && c <= '9') || c == '-' || c == '_' || c == '.';
      piece = keep ? std::string(1, static_cast<char>(c)) : "_";
      n = 1;
    }
    if (out.size() + piece.size() > kMaxBytes) break;
    out += piece;
    i += n;
  }
  while (!out.empty() && out.front() == '.') out.erase(out.begin());
  if (out.empty()) out = "clip";
  return out;
}

std::string OutputNamer::unique_name(const std::string& clip_path) {
  const std::string stem = safe_stem(clip_path);
  std::string name = stem;
  for (int n = 2; used_.count(name); ++n) name = stem + "-" + std::to_string(n);
  used_.insert(name);
  return name;
}

}  // namespace clipwarden::cli
