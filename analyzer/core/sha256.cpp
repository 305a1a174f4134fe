#include "analyzer/core/sha256.h"

#include <cstdio>
#include <filesystem>
#include <new>
#include <vector>

extern "C" {
#include <libavutil/mem.h>
#include <libavutil/sha.h>
}

#include "clipwarden/clip_source.h"

namespace clipwarden {

void Sha256::Free::operator()(AVSHA* p) const { av_free(p); }

Sha256::Sha256() : ctx_(av_sha_alloc()) {
  if (!ctx_) throw std::bad_alloc();
  av_sha_init(ctx_.get(), 256);
}

void Sha256::update(const void* data, size_t size) {
  av_sha_update(ctx_.get(), static_cast<const uint8_t*>(data), size);
}

std::array<uint8_t, 32> Sha256::digest() {
  std::array<uint8_t, 32> out{};
  av_sha_final(ctx_.get(), out.data());
  return out;
}

std::string Sha256::hex_digest() {
  static const char* digits = "0123456789abcdef";
  std::string hex;
  for (uint8_t b : digest()) {
    hex.push_back(digits[b >> 4]);
    hex.push_back(digits[b & 15]);
  }
  return hex;
}

Expected<std::string> sha256_file(const std::string& path) {
  if (auto st = check_clip_path(path); !st) return st.error();
  std::error_code ec;
  if (std::filesystem::is_directory(path, ec)) return input_error(path, "is a folder, not a file");
  std::FILE* file = std::fopen(path.c_str(), "rb");
  if (!file) return input_error(path, "cannot read the file to hash it");
  Sha256 hash;
  std::vector<uint8_t> chunk(1 << 20);  // 1 MiB at a time: memory independent of file size
  size_t got;
  while ((got = std::fread(chunk.data(), 1, chunk.size(), file)) > 0)
    hash.update(chunk.data(), got);
  const bool failed = std::ferror(file) != 0;
  std::fclose(file);
  if (failed) return input_error(path, "read error while hashing the file");
  return hash.hex_digest();
}

}  // namespace clipwarden
