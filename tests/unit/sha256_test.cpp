// SHA-256 (analyzer/core/sha256.*, libavutil underneath). Expected digests: FIPS 180-2,
// Appendix B (B.1 "abc", B.2 the 448-bit two-block message, B.3 one million
// 'a'), as recalled from memory and confirmed with coreutils sha256sum while
// writing this test (tests/reference/decode_sha256sum_test.cpp repeats that
// comparison on every run).
#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "analyzer/core/sha256.h"

using clipwarden::Sha256;

namespace {
std::string digest(const std::string& message) {
  Sha256 hash;
  hash.update(message);
  return hash.hex_digest();
}
}  // namespace

TEST(Sha256, FipsAppendixB1OneBlock) {
  EXPECT_EQ(digest("abc"), "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
}

TEST(Sha256, FipsAppendixB2TwoBlocks) {
  EXPECT_EQ(digest("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq"),
            "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
}

TEST(Sha256, FipsAppendixB3OneMillionA) {
  EXPECT_EQ(digest(std::string(1000000, 'a')),
            "cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0");
}

TEST(Sha256, EmptyMessage) {
  // The empty string's digest (sha256sum < /dev/null).
  EXPECT_EQ(digest(""), "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
}

TEST(Sha256, PiecewiseUpdatesEqualOneUpdate) {
  // Padding edge cases: lengths around 55/56/64 bytes, fed in odd pieces.
  for (size_t length : {0u, 1u, 55u, 56u, 57u, 63u, 64u, 65u, 119u, 120u, 1000u}) {
    std::string message;
    for (size_t i = 0; i < length; ++i) message.push_back(static_cast<char>('a' + i * 7 % 26));
    Sha256 pieces;
    for (size_t at = 0; at < length; at += 13) pieces.update(message.substr(at, 13));
    EXPECT_EQ(pieces.hex_digest(), digest(message)) << "length " << length;
  }
}
