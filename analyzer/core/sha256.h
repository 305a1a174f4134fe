// SHA-256 (FIPS 180-4) of bytes and of files: the content key of the results
// store, the clip hash of reports and queues, the shard set's fingerprint and
// the page's content-security-policy hashes. One implementation for the whole
// program, libavutil's (linked for decoding anyway); the unit test checks it
// against FIPS 180-4's worked examples.
#pragma once

#include <array>
#include <cstddef>
#include <cstdint>
#include <memory>
#include <string>
#include <string_view>

struct AVSHA;

namespace clipwarden {

class Sha256 {
 public:
  Sha256();
  void update(const void* data, size_t size);
  void update(std::string_view text) { update(text.data(), text.size()); }
  // Call one of these once, after the last update.
  std::array<uint8_t, 32> digest();
  std::string hex_digest();  // 64 lowercase hex digits

 private:
  struct Free {
    void operator()(AVSHA* p) const;
  };
  std::unique_ptr<AVSHA, Free> ctx_;
};

}  // namespace clipwarden
