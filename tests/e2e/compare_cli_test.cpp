// `clipwarden compare` end to end, through the built binary. The reports are
// synthetic (tests/support/compare_reports.h): invented per-frame values
// drawn with a fixed seed, written with the report model and
// write_json_report, to test the plumbing -- pairing, averaging, listing,
// the verdicts, the exit statuses and the two output files. B carries
// injected flicker spikes on half of the prompts and nothing else changes,
// so the expected verdicts follow from the construction: B worse on flicker,
// no difference on drift.
#include <gtest/gtest.h>

#include <filesystem>
#include <random>
#include <set>

#include "support/compare_cli.h"
#include "support/compare_python.h"
#include "support/compare_reports.h"

namespace {

using clipwarden::test::find_compared;
using clipwarden::test::read_json_file;
using clipwarden::test::run_compare;
using clipwarden::test::scenario_clip;
using clipwarden::test::TempFolder;
using nlohmann::json;
namespace fs = std::filesystem;
std::string sh(const std::string& s) { return clipwarden::test::shell_quoted(s); }  // for the shell

// Two plain report folders, paired by report name: p00..p19 on both sides,
// flicker injected into B's even prompts, one extra report on each side.
struct PlainFolders {
  TempFolder root{"compare-plain"};
  std::string a = root.file("A"), b = root.file("B"), out = root.file("out");
  PlainFolders() {
    fs::create_directories(a);
    fs::create_directories(b);
    std::mt19937_64 rng(7001);
    const auto levels = clipwarden::test::draw_prompt_levels(rng, 21);
    for (int i = 0; i < 20; ++i) {
      char name[16];
      std::snprintf(name, sizeof name, "p%02d", i);
      clipwarden::test::write_synthetic_report(
          scenario_clip(rng, levels[i], std::string("a/") + name + ".mp4", false),
          a + "/" + name + ".json");
      clipwarden::test::write_synthetic_report(
          scenario_clip(rng, levels[i], std::string("b/") + name + ".mp4", i % 2 == 0),
          b + "/" + name + ".json");
    }
    clipwarden::test::write_synthetic_report(scenario_clip(rng, levels[20], "a/only.mp4", false),
                                             a + "/only_in_a.json");
    clipwarden::test::write_synthetic_report(scenario_clip(rng, levels[20], "b/only.mp4", false),
                                             b + "/only_in_b.json");
  }
  std::string args() const { return sh(a) + " " + sh(b) + " --out " + sh(out) + " --quiet"; }
};

}  // namespace

TEST(CompareCli, InjectedFlickerMakesBWorseOnFlickerOnly) {
  PlainFolders folders;
  ASSERT_EQ(run_compare(folders.args()), 0);
  const json c = read_json_file(folders.out + "/compare.json");
  ASSERT_FALSE(c.is_discarded());
  EXPECT_EQ(c["pair_by"], "name");
  EXPECT_EQ(c["pairs"].size(), 20u);

  // Flicker is exploratory by default: its unadjusted reading, no verdict.
  const json* flicker = find_compared(c, "flicker", "p95");
  ASSERT_NE(flicker, nullptr);
  EXPECT_EQ((*flicker)["family"], "exploratory");
  EXPECT_EQ((*flicker)["better"], "neither");
  EXPECT_EQ((*flicker)["unadjusted_better"], "a");
  EXPECT_LT((*flicker)["p_value"].get<double>(), 0.05);
  EXPECT_TRUE((*flicker)["p_holm"].is_null());
  EXPECT_GT((*flicker)["mean_diff"].get<double>(), 0.0);
  EXPECT_GT((*flicker)["ci_low"].get<double>(), 0.0);  // the interval excludes no change
  EXPECT_GE((*flicker)["wins_a"].get<int>(), 10);      // at least the 10 injected prompts
  EXPECT_EQ((*flicker)["n"], 20);
  EXPECT_EQ((*flicker)["direction"], "lower flicker p95 is better");

  const json* segments = find_compared(c, "flicker", "segment_count");
  ASSERT_NE(segments, nullptr);
  EXPECT_EQ((*segments)["wins_a"], 10);
  EXPECT_EQ((*segments)["ties"], 10);

  const json* drift = find_compared(c, "drift", "p95");
  ASSERT_NE(drift, nullptr);
  EXPECT_EQ((*drift)["better"], "neither");
  const json* coherence = find_compared(c, "coherence", "score");
  ASSERT_NE(coherence, nullptr);
  EXPECT_EQ((*coherence)["family"], "primary");
  EXPECT_EQ((*coherence)["direction"], "higher coherence is better");
  EXPECT_EQ((*coherence)["better"], "a");
  EXPECT_LT((*coherence)["p_holm"].get<double>(), 0.05);

  // Named primary, flicker gets a verdict, Holm-adjusted within its family.
  ASSERT_EQ(run_compare(folders.args() + " --primary flicker:p95 --primary coherence"), 0);
  const json named = read_json_file(folders.out + "/compare.json");
  const json* primary_flicker = find_compared(named, "flicker", "p95");
  ASSERT_NE(primary_flicker, nullptr);
  EXPECT_EQ((*primary_flicker)["family"], "primary");
  EXPECT_EQ((*primary_flicker)["better"], "a");
  EXPECT_EQ((*find_compared(named, "verdict", "pass_share"))["family"], "exploratory");
  EXPECT_EQ(named["design"]["primary_family_size"], 2);

  std::set<std::pair<std::string, std::string>> unpaired;
  for (const auto& u : c["unpaired"])
    unpaired.insert({u["side"].get<std::string>(), u["key"].get<std::string>()});
  EXPECT_EQ(unpaired, (std::set<std::pair<std::string, std::string>>{{"a", "only_in_a"},
                                                                     {"b", "only_in_b"}}));
}

TEST(CompareCli, FailIfWorseSetsTheExitStatus) {
  PlainFolders folders;
  EXPECT_EQ(run_compare(folders.args() + " --fail-if-worse flicker"), 1);
  EXPECT_EQ(run_compare(folders.args() + " --fail-if-worse flicker.p95"), 1);
  EXPECT_EQ(run_compare(folders.args() + " --fail-if-worse drift"), 0);
  EXPECT_EQ(run_compare(folders.args() + " --fail-if-worse drift --fail-if-worse flicker"), 1);
  EXPECT_EQ(run_compare(folders.args() + " --fail-if-worse no_such_metric"), 2);
  // Swapping the sides makes B the better one: nothing fails.
  EXPECT_EQ(run_compare(sh(folders.b) + " " + sh(folders.a) + " --out " + sh(folders.out) +
                        " --quiet --fail-if-worse flicker"),
            0);
}

TEST(CompareCli, UsageAndInputErrors) {
  PlainFolders folders;
  EXPECT_EQ(run_compare("--help"), 0);
  EXPECT_EQ(run_compare(sh(folders.a) + " " + sh(folders.b)), 2);  // no --out
  EXPECT_EQ(run_compare(sh(folders.a) + " --out " + sh(folders.out)), 2);
  EXPECT_EQ(run_compare(folders.args() + " --pair-by seed"), 2);
  EXPECT_EQ(run_compare(folders.args() + " --stat p99"), 2);
  EXPECT_EQ(run_compare(folders.args() + " --resamples 5"), 2);
  EXPECT_EQ(run_compare(folders.args() + " --primary no_such_metric"), 2);
  EXPECT_EQ(run_compare(sh(folders.root.file("missing")) + " " + sh(folders.b) + " --out " +
                        sh(folders.out)),
            3);
  fs::create_directories(folders.root.file("empty"));
  EXPECT_EQ(run_compare(sh(folders.root.file("empty")) + " " + sh(folders.b) + " --out " +
                        sh(folders.out)),
            3);
  // Pairing by prompt_id when plain folders have none: every clip is listed
  // as unpaired and nothing pairs up.
  EXPECT_EQ(run_compare(folders.args() + " --pair-by prompt_id"), 2);
  const json c = read_json_file(folders.out + "/compare.json");
  EXPECT_EQ(c["unpaired"].size(), 42u);
}
