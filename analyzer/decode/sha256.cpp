#include "analyzer/decode/sha256.h"

#include <cstdio>
#include <filesystem>
#include <vector>

#include "clipwarden/clip_source.h"

namespace clipwarden::decode {
namespace {

// FIPS 180-4 section 4.2.2: the first 32 bits of the fractional parts of the
// cube roots of the first 64 primes (the unit test recomputes them).
constexpr uint32_t kRound[64] = {
    0x428a2f98, 0x71374491, 0xb5c0fbcf, 0xe9b5dba5, 0x3956c25b, 0x59f111f1, 0x923f82a4, 0xab1c5ed5,
    0xd807aa98, 0x12835b01, 0x243185be, 0x550c7dc3, 0x72be5d74, 0x80deb1fe, 0x9bdc06a7, 0xc19bf174,
    0xe49b69c1, 0xefbe4786, 0x0fc19dc6, 0x240ca1cc, 0x2de92c6f, 0x4a7484aa, 0x5cb0a9dc, 0x76f988da,
    0x983e5152, 0xa831c66d, 0xb00327c8, 0xbf597fc7, 0xc6e00bf3, 0xd5a79147, 0x06ca6351, 0x14292967,
    0x27b70a85, 0x2e1b2138, 0x4d2c6dfc, 0x53380d13, 0x650a7354, 0x766a0abb, 0x81c2c92e, 0x92722c85,
    0xa2bfe8a1, 0xa81a664b, 0xc24b8b70, 0xc76c51a3, 0xd192e819, 0xd6990624, 0xf40e3585, 0x106aa070,
    0x19a4c116, 0x1e376c08, 0x2748774c, 0x34b0bcb5, 0x391c0cb3, 0x4ed8aa4a, 0x5b9cca4f, 0x682e6ff3,
    0x748f82ee, 0x78a5636f, 0x84c87814, 0x8cc70208, 0x90befffa, 0xa4506ceb, 0xbef9a3f7, 0xc67178f2};

// Section 5.3.3: the first 32 bits of the fractional parts of the square
// roots of the first 8 primes.
constexpr std::array<uint32_t, 8> kInitial = {0x6a09e667, 0xbb67ae85, 0x3c6ef372, 0xa54ff53a,
                                              0x510e527f, 0x9b05688c, 0x1f83d9ab, 0x5be0cd19};

constexpr uint32_t rotr(uint32_t x, int n) { return (x >> n) | (x << (32 - n)); }
// Section 4.1.2, functions (4.2)-(4.7).
constexpr uint32_t ch(uint32_t x, uint32_t y, uint32_t z) { return (x & y) ^ (~x & z); }
constexpr uint32_t maj(uint32_t x, uint32_t y, uint32_t z) { return (x & y) ^ (x & z) ^ (y & z); }
constexpr uint32_t big_sigma0(uint32_t x) { return rotr(x, 2) ^ rotr(x, 13) ^ rotr(x, 22); }
constexpr uint32_t big_sigma1(uint32_t x) { return rotr(x, 6) ^ rotr(x, 11) ^ rotr(x, 25); }
constexpr uint32_t small_sigma0(uint32_t x) { return rotr(x, 7) ^ rotr(x, 18) ^ (x >> 3); }
constexpr uint32_t small_sigma1(uint32_t x) { return rotr(x, 17) ^ rotr(x, 19) ^ (x >> 10); }

}  // namespace

Sha256::Sha256() : state_(kInitial) {}

// Section 6.2.2: message schedule, 64 rounds, add to the hash value.
void Sha256::compress(const uint8_t block[64]) {
  uint32_t w[64];
  for (int t = 0; t < 16; ++t)
    w[t] = uint32_t{block[4 * t]} << 24 | uint32_t{block[4 * t + 1]} << 16 |
           uint32_t{block[4 * t + 2]} << 8 | uint32_t{block[4 * t + 3]};
  for (int t = 16; t < 64; ++t)
    w[t] = small_sigma1(w[t - 2]) + w[t - 7] + small_sigma0(w[t - 15]) + w[t - 16];
  uint32_t a = state_[0], b = state_[1], c = state_[2], d = state_[3];
  uint32_t e = state_[4], f = state_[5], g = state_[6], h = state_[7];
  for (int t = 0; t < 64; ++t) {
    const uint32_t t1 = h + big_sigma1(e) + ch(e, f, g) + kRound[t] + w[t];
    const uint32_t t2 = big_sigma0(a) + maj(a, b, c);
    h = g;
    g = f;
    f = e;
    e = d + t1;
    d = c;
    c = b;
    b = a;
    a = t1 + t2;
  }
  state_[0] += a;
  state_[1] += b;
  state_[2] += c;
  state_[3] += d;
  state_[4] += e;
  state_[5] += f;
  state_[6] += g;
  state_[7] += h;
}

void Sha256::update(const uint8_t* data, size_t size) {
  total_bytes_ += size;
  while (size > 0) {
    if (buffered_ == 0 && size >= 64) {  // whole blocks straight from the input
      compress(data);
      data += 64;
      size -= 64;
      continue;
    }
    const size_t take = std::min(size, 64 - buffered_);
    std::copy(data, data + take, buffer_.begin() + static_cast<std::ptrdiff_t>(buffered_));
    buffered_ += take;
    data += take;
    size -= take;
    if (buffered_ == 64) {
      compress(buffer_.data());
      buffered_ = 0;
    }
  }
}

// Section 5.1.1 padding: a 1 bit, zeros to 448 mod 512, the length in bits
// as a 64-bit big-endian number.
std::string Sha256::hex_digest() {
  const uint64_t bit_length = total_bytes_ * 8;
  const uint8_t one = 0x80;
  update(&one, 1);
  const uint8_t zero = 0;
  while (buffered_ != 56) update(&zero, 1);
  uint8_t length[8];
  for (int i = 0; i < 8; ++i) length[i] = static_cast<uint8_t>(bit_length >> (56 - 8 * i));
  update(length, 8);
  std::string hex;
  char digits[9];
  for (uint32_t word : state_) {
    std::snprintf(digits, sizeof digits, "%08x", word);
    hex += digits;
  }
  return hex;
}

}  // namespace clipwarden::decode

namespace clipwarden {

Expected<std::string> sha256_file(const std::string& path) {
  if (auto st = check_clip_path(path); !st) return st.error();
  std::error_code ec;
  if (std::filesystem::is_directory(path, ec)) return input_error(path, "is a folder, not a file");
  std::FILE* file = std::fopen(path.c_str(), "rb");
  if (!file) return input_error(path, "cannot read the file to hash it");
  decode::Sha256 hash;
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
