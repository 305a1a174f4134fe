// Folder inputs that hold no clips (docs/gate.md): a folder named like a video
// file is taken as a clip, so the batch reports it as unreadable instead of
// dropping it; a folder argument with no clips at all warns.
#include <gtest/gtest.h>

#include <filesystem>

#include "clipwarden/gate.h"
#include "support/clips.h"
#include "support/gate_files.h"

using namespace clipwarden;
using namespace clipwarden::test;
namespace fs = std::filesystem;

TEST(GateInputsFolders, FolderNamedLikeAClipIsKeptAsAClip) {
  TempDir dir;
  fs::create_directories(dir.path() / "batch" / "take.mp4");
  write_text(dir.path() / "batch" / "real.mp4", "x");
  auto collected = collect_inputs({dir.file("batch")});
  ASSERT_TRUE(collected.ok()) << collected.error().message();
  ASSERT_EQ(collected->inputs.size(), 2u);
  EXPECT_EQ(fs::path(collected->inputs[0].path).filename(), "real.mp4");
  EXPECT_EQ(fs::path(collected->inputs[1].path).filename(), "take.mp4");
  EXPECT_TRUE(collected->warnings.empty());
}

TEST(GateInputsFolders, FolderArgumentWithoutClipsWarns) {
  TempDir dir;
  fs::create_directories(dir.path() / "empty" / "sub");
  auto collected = collect_inputs({dir.file("empty")});
  ASSERT_TRUE(collected.ok());
  EXPECT_TRUE(collected->inputs.empty());
  ASSERT_EQ(collected->warnings.size(), 1u);
  EXPECT_NE(collected->warnings[0].find("holds no clips"), std::string::npos);
}
