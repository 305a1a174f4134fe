// `clipwarden inspect` end to end on opencv-doc footage (docs/html.md: writes PNG
// panels for one frame and prints their paths; exit 2 for bad usage, 3 for
// an unreadable input).
#include <gtest/gtest.h>

#include <filesystem>
#include <sstream>

#include "support/clips.h"

using namespace clipwarden;

namespace {
std::vector<std::string> lines(const std::string& text) {
  std::vector<std::string> out;
  std::istringstream in(text);
  for (std::string line; std::getline(in, line);)
    if (!line.empty()) out.push_back(line);
  return out;
}
}  // namespace

TEST(InspectCli, WritesAndPrintsEveryPanel) {
  CLIPWARDEN_SKIP_WITHOUT_DATA(clip, "tree.avi");
  test::TempDir dir;
  const auto r = test::run_command(
      {CLIPWARDEN_BINARY, "inspect", clip, "--frame", "30", "--out", dir.path().string()});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto paths = lines(r.out);
  ASSERT_EQ(paths.size(), 8u) << r.out;
  for (const auto& p : paths) {
    EXPECT_TRUE(std::filesystem::exists(p)) << p;
    EXPECT_NE(p.find("tree-f000030-"), std::string::npos) << p;
  }
}

TEST(InspectCli, FrameZeroWritesWhatExistsAndSaysSo) {
  CLIPWARDEN_SKIP_WITHOUT_DATA(clip, "tree.avi");
  test::TempDir dir;
  const auto r = test::run_command(
      {CLIPWARDEN_BINARY, "inspect", clip, "--frame", "0", "--out", dir.path().string()});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto paths = lines(r.out);
  ASSERT_EQ(paths.size(), 1u);
  EXPECT_NE(paths[0].find("tree-f000000-current.png"), std::string::npos);
  EXPECT_NE(r.err.find("no previous frame"), std::string::npos) << r.err;
}

TEST(InspectCli, BadRequestsAreOneLineErrors) {
  CLIPWARDEN_SKIP_WITHOUT_DATA(clip, "tree.avi");
  test::TempDir dir;
  auto r = test::run_command(
      {CLIPWARDEN_BINARY, "inspect", clip, "--frame", "500", "--out", dir.path().string()});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_NE(r.err.find("the clip has 68 frames (0 to 67)"), std::string::npos) << r.err;
  EXPECT_EQ(lines(r.err).size(), 1u) << r.err;
  r = test::run_command({CLIPWARDEN_BINARY, "inspect", clip});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_NE(r.err.find("--frame"), std::string::npos);
  r = test::run_command({CLIPWARDEN_BINARY, "inspect", clip, "--frame", "-3"});
  EXPECT_EQ(r.exit_code, 2);
  r = test::run_command({CLIPWARDEN_BINARY, "inspect", dir.file("missing.mp4"), "--frame", "3"});
  EXPECT_EQ(r.exit_code, 3);
  EXPECT_NE(r.err.find("missing.mp4"), std::string::npos);
  EXPECT_TRUE(std::filesystem::is_empty(dir.path()));
}
