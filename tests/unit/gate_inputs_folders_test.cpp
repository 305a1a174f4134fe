// Folder inputs that hold no clips (docs/gate.md): a folder named like a video
// file is taken as a clip, so the batch reports it as unreadable instead of
// dropping it; a folder argument with no clips at all warns.
#include <gtest/gtest.h>

#include <sys/stat.h>

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

// What a folder scan passes over is said, not dropped silently: a link to a
// folder (not followed, so a link loop cannot hang the scan), a dangling
// link, and a pipe named like a clip. A link to a clip file is followed.
TEST(GateInputsFolders, LinksAndPipesPassedOverAreReported) {
  TempDir dir;
  const fs::path batch = dir.path() / "batch";
  fs::create_directories(batch);
  fs::create_directories(dir.path() / "elsewhere");
  write_text(dir.path() / "elsewhere" / "far.mp4", "x");
  write_text(batch / "real.mp4", "x");
  fs::create_directory_symlink(dir.path() / "elsewhere", batch / "linked_folder");
  fs::create_symlink(dir.path() / "missing.mp4", batch / "dangling.mp4");
  fs::create_symlink(batch / "real.mp4", batch / "alias.mp4");
  ASSERT_EQ(::mkfifo((batch / "pipe.mp4").c_str(), 0644), 0);
  auto collected = collect_inputs({batch.string()});
  ASSERT_TRUE(collected.ok()) << collected.error().message();
  ASSERT_EQ(collected->inputs.size(), 2u);  // alias.mp4 and real.mp4
  std::string all;
  for (const auto& w : collected->warnings) all += w + "\n";
  EXPECT_EQ(collected->warnings.size(), 3u) << all;
  EXPECT_NE(all.find("linked_folder: symbolic link to a folder, not followed"), std::string::npos)
      << all;
  EXPECT_NE(all.find("dangling.mp4: dangling symbolic link"), std::string::npos) << all;
  EXPECT_NE(all.find("pipe.mp4: not a regular file"), std::string::npos) << all;
}

// "A/x.mp4" and "./A/x.mp4" are one clip: one id, one queue line.
TEST(GateInputsFolders, IdDoesNotDependOnHowThePathWasTyped) {
  TempDir dir;
  write_text(dir.path() / "A" / "x.mp4", "x");
  const std::string plain = (dir.path() / "A" / "x.mp4").string();
  const std::string dotted = (dir.path() / "." / "A" / "." / "x.mp4").string();
  auto collected = collect_inputs({plain, dotted, (dir.path() / "A" / "").string()});
  ASSERT_TRUE(collected.ok()) << collected.error().message();
  ASSERT_EQ(collected->inputs.size(), 1u);
  EXPECT_EQ(collected->inputs[0].id, plain);
  EXPECT_EQ(collected->warnings.size(), 2u);  // named twice, judged once
}
