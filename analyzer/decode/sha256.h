// SHA-256 as specified in FIPS 180-4 (Secure Hash Standard, NIST 2015),
// section 6.2: the content key of the results store.
#pragma once

#include <array>
#include <cstddef>
#include <cstdint>
#include <string>

namespace clipwarden::decode {

class Sha256 {
 public:
  Sha256();
  void update(const uint8_t* data, size_t size);
  void update(const std::string& text) {
    update(reinterpret_cast<const uint8_t*>(text.data()), text.size());
  }
  // The digest as 64 lowercase hex digits. Call once, after the last update.
  std::string hex_digest();

 private:
  void compress(const uint8_t block[64]);

  std::array<uint32_t, 8> state_;
  std::array<uint8_t, 64> buffer_{};
  size_t buffered_ = 0;
  uint64_t total_bytes_ = 0;
};

}  // namespace clipwarden::decode
