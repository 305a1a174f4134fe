// Content and settings hashes for the results store (SHA-256, FIPS 180-4,
// computed by libavutil's implementation).
#include <algorithm>
#include <cerrno>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <memory>

extern "C" {
#include <libavutil/mem.h>
#include <libavutil/sha.h>
}

#include "clipwarden/clip_source.h"
#include "clipwarden/store.h"
#include "clipwarden/version.h"

namespace clipwarden {
namespace {

class Sha256 {
 public:
  Sha256() : ctx_(av_sha_alloc()) { av_sha_init(ctx_.get(), 256); }
  void update(const void* data, size_t size) {
    av_sha_update(ctx_.get(), static_cast<const uint8_t*>(data), size);
  }
  std::string hex() {
    uint8_t digest[32];
    av_sha_final(ctx_.get(), digest);
    static const char* digits = "0123456789abcdef";
    std::string out;
    for (uint8_t b : digest) {
      out.push_back(digits[b >> 4]);
      out.push_back(digits[b & 15]);
    }
    return out;
  }

 private:
  struct Free {
    void operator()(AVSHA* p) const { av_free(p); }
  };
  std::unique_ptr<AVSHA, Free> ctx_;
};

Expected<std::string> file_sha256(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) return input_error(path, std::string("cannot open: ") + std::strerror(errno));
  Sha256 sha;
  std::vector<char> buffer(1 << 20);
  while (in) {
    in.read(buffer.data(), static_cast<std::streamsize>(buffer.size()));
    if (in.gcount() > 0) sha.update(buffer.data(), static_cast<size_t>(in.gcount()));
  }
  if (in.bad()) return input_error(path, "read error");
  return sha.hex();
}

}  // namespace

std::string sha256_hex(std::string_view bytes) {
  Sha256 sha;
  sha.update(bytes.data(), bytes.size());
  return sha.hex();
}

Expected<std::string> content_sha256(const std::string& clip_path) {
  namespace fs = std::filesystem;
  // The same check as every other entry point: a device or a pipe named as
  // a clip must be refused, not read until it ends (it may never end).
  if (auto st = check_clip_path(clip_path); !st) return st.error();
  std::error_code ec;
  if (!fs::is_directory(clip_path, ec)) return file_sha256(clip_path);
  std::vector<fs::path> files;
  for (const auto& entry : fs::directory_iterator(clip_path, ec))
    if (entry.is_regular_file()) files.push_back(entry.path());
  if (ec) return input_error(clip_path, "cannot list folder: " + ec.message());
  std::sort(files.begin(), files.end());
  std::string listing;
  for (const auto& f : files) {
    auto h = file_sha256(f.string());
    if (!h) return h.error();
    listing += f.filename().string() + " " + *h + "\n";
  }
  return sha256_hex(listing);
}

std::string settings_hash(const AnalysisSettings& settings, const Policy& policy) {
  AnalysisSettings canonical = settings;
  canonical.threads = 0;  // results never depend on the thread count
  nlohmann::json s = settings_to_json(canonical);
  if (s.is_object()) s.erase("threads");
  // nlohmann::json keeps object keys sorted, so dump() is canonical.
  return sha256_hex(s.dump() + "\n" + policy_to_json(policy).dump() + "\n" + version());
}

}  // namespace clipwarden
