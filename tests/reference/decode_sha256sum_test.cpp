// sha256_file against coreutils sha256sum on the same bytes: a real clip
// from opencv-doc (several MiB, many 1 MiB read chunks) and small files
// around the 64-byte block boundary, plus the FIPS 180-2 Appendix B
// messages used in tests/unit/sha256_test.cpp.
#include <gtest/gtest.h>

#include <fstream>

#include "clipwarden/clip_source.h"
#include "support/clips.h"

using namespace clipwarden;
using namespace clipwarden::test;

namespace {

std::string coreutils_sha256(const std::string& path) {
  const CommandResult r = run_command({"sha256sum", "-b", path});
  if (r.exit_code != 0) return "sha256sum failed: " + r.err;
  return r.out.substr(0, 64);
}

}  // namespace

TEST(DecodeSha256sum, OpencvClipMatchesCoreutils) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("sha256sum");
  CLIPWARDEN_SKIP_WITHOUT_DATA(clip, "Megamind.avi");
  auto ours = sha256_file(clip);
  ASSERT_TRUE(ours.ok()) << ours.error().message();
  EXPECT_EQ(*ours, coreutils_sha256(clip));
}

TEST(DecodeSha256sum, SmallFilesAndFipsMessagesMatchCoreutils) {
  CLIPWARDEN_SKIP_WITHOUT_TOOL("sha256sum");
  TempDir dir;
  std::vector<std::string> contents = {"", "abc",
                                       "abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq",
                                       std::string(1000000, 'a')};
  for (size_t n : {55u, 56u, 63u, 64u, 65u, 1048575u, 1048576u, 1048577u}) {
    std::string bytes(n, '\0');
    for (size_t i = 0; i < n; ++i) bytes[i] = static_cast<char>((i * 131 + 7) & 0xFF);
    contents.push_back(bytes);
  }
  for (size_t i = 0; i < contents.size(); ++i) {
    const std::string path = dir.file("f" + std::to_string(i));
    std::ofstream(path, std::ios::binary) << contents[i];
    auto ours = sha256_file(path);
    ASSERT_TRUE(ours.ok()) << ours.error().message();
    EXPECT_EQ(*ours, coreutils_sha256(path)) << contents[i].size() << " bytes";
  }
}

TEST(DecodeSha256sum, MissingFileIsAnInputError) {
  auto result = sha256_file("/nonexistent/clip.mp4");
  ASSERT_FALSE(result.ok());
  EXPECT_EQ(result.error().kind, ErrorKind::input);
  EXPECT_EQ(result.error().subject, "/nonexistent/clip.mp4");
}
