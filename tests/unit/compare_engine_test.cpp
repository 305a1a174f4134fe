// The compare engine (compare_report_folders) on reports whose summary
// values are chosen by hand (constant invented series), so every number in
// the result can be worked out on paper.
#include <gtest/gtest.h>

#include <filesystem>

#include "clipwarden/compare.h"
#include "support/compare_python.h"
#include "support/compare_reports.h"

using namespace clipwarden;

namespace {

test::SyntheticClip constant_clip(double flicker, double warp, double drift, double coherence) {
  test::SyntheticClip c;
  c.clip_path = "clip.mp4";
  c.series["flicker"] = std::vector<double>(10, flicker);
  c.series["warp_error"] = std::vector<double>(10, warp);
  c.series["drift"] = std::vector<double>(10, drift);
  c.coherence = coherence;
  return c;
}

const MetricComparison& find(const Comparison& c, const std::string& key) {
  for (const auto& m : c.metrics)
    if (m.what.key() == key) return m;
  ADD_FAILURE() << "no " << key;
  return c.metrics.front();
}

}  // namespace

TEST(CompareEngine, HandWorkedResult) {
  // Eight prompts, k = 1..8. A has two seeds per prompt with flicker 0.01k
  // and 0.03k (average 0.02k); B has one clip with flicker 0.021k, so
  // d = +0.001k on every prompt. B's coherence is k points lower. Warp error
  // moves by +-0.0001k alternately (+1 -2 +3 -4 +5 -6 +7 -8, times 1e-4);
  // drift is the same everywhere.
  test::TempFolder root("compare-engine");
  const std::string a = root.file("A"), b = root.file("B");
  std::filesystem::create_directories(a);
  std::filesystem::create_directories(b);
  for (int k = 1; k <= 8; ++k) {
    const std::string name = "p" + std::to_string(k);
    const double warp = 0.01 * k;
    test::write_synthetic_report(constant_clip(0.01 * k, warp, 1.0, 90),
                                 a + "/" + name + "_s1.json");
    test::write_synthetic_report(constant_clip(0.03 * k, warp, 1.0, 90),
                                 a + "/" + name + "_s2.json");
    const double warp_b = warp + (k % 2 ? 1e-4 : -1e-4) * k;
    test::write_synthetic_report(constant_clip(0.021 * k, warp_b, 1.0, 90 - k),
                                 b + "/" + name + ".json");
  }
  // Gate-style queues give the seeds of a prompt one prompt_id.
  {
    std::FILE* qa = std::fopen((a + "/queue.jsonl").c_str(), "w");
    std::FILE* qb = std::fopen((b + "/queue.jsonl").c_str(), "w");
    for (int k = 1; k <= 8; ++k) {
      for (int s = 1; s <= 2; ++s)
        std::fprintf(qa,
                     "{\"id\":\"a%d_%d\",\"path\":\"x\",\"report\":\"p%d_s%d.json\",\"prompt_id\":"
                     "\"p%d\",\"seed\":%d}\n",
                     k, s, k, s, k, s);
      std::fprintf(qb,
                   "{\"id\":\"b%d\",\"path\":\"x\",\"report\":\"p%d.json\",\"prompt_id\":\"p%d\","
                   "\"seed\":1}\n",
                   k, k, k);
    }
    std::fclose(qa);
    std::fclose(qb);
  }
  auto result = compare_report_folders(a, b);
  ASSERT_TRUE(result.ok()) << result.error().message();
  const Comparison& c = *result;
  EXPECT_EQ(c.pair_by, PairBy::prompt_id);
  EXPECT_TRUE(c.averaged);
  ASSERT_EQ(c.pairs.size(), 8u);
  EXPECT_TRUE(c.unpaired.empty());

  const auto& flicker = find(c, "flicker.p95");
  // All eight differences positive and untied: exact p = 2 * (1/2^8).
  EXPECT_EQ(flicker.test, "exact");
  EXPECT_DOUBLE_EQ(flicker.p_value, 2.0 / 256);
  EXPECT_NEAR(flicker.mean_diff, 0.001 * 4.5, 1e-12);
  EXPECT_NEAR(flicker.median_diff, 0.001 * 4.5, 1e-12);
  EXPECT_EQ(flicker.wins_a, 8);
  EXPECT_DOUBLE_EQ(flicker.effect_size, 1.0);
  EXPECT_EQ(flicker.better, "a");
  for (size_t i = 0; i < c.pairs.size(); ++i) {
    const auto k = static_cast<double>(i + 1);
    const size_t column = &flicker - c.metrics.data();
    EXPECT_NEAR(c.pairs[i].a_values[column], 0.02 * k, 1e-15);  // the two seeds averaged
  }

  const auto& coherence = find(c, "coherence.score");
  EXPECT_DOUBLE_EQ(coherence.p_value, 2.0 / 256);
  EXPECT_EQ(coherence.better, "a");  // lower coherence in B: worse
  EXPECT_EQ(coherence.what.direction, "higher coherence is better");

  // drift and every segment count: no non-zero difference, no test, left out
  // of the Holm family.
  for (const char* key : {"drift.p95", "flicker.segment_count", "drift.segment_count"}) {
    const auto& m = find(c, key);
    EXPECT_EQ(m.test, "none") << key;
    EXPECT_EQ(m.p_value, 1.0) << key;
    EXPECT_EQ(m.p_holm, 1.0) << key;
    EXPECT_EQ(m.ties, 8) << key;
    EXPECT_EQ(m.better, "neither") << key;
  }

  // Holm over the family {coherence, flicker p95, warp p95} (m = 3): the two
  // smallest p are both 2/256; 3 * 2/256 = 0.0234375, then
  // max(0.0234375, 2 * 2/256) = 0.0234375.
  const auto& warp = find(c, "warp_error.p95");
  EXPECT_GT(warp.p_value, 0.05);
  EXPECT_DOUBLE_EQ(coherence.p_holm, 3 * 2.0 / 256);
  EXPECT_DOUBLE_EQ(flicker.p_holm, 3 * 2.0 / 256);
  EXPECT_DOUBLE_EQ(warp.p_holm, std::max(3 * 2.0 / 256, warp.p_value));
  EXPECT_EQ(warp.better, "neither");
  EXPECT_EQ(warp.wins_a + warp.wins_b, 8);
}

TEST(CompareEngine, BadOptionsAndFoldersAreErrors) {
  test::TempFolder root("compare-engine-bad");
  CompareOptions o;
  o.statistics = {"p99"};
  auto r = compare_report_folders(root.path(), root.path(), o);
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.error().kind, ErrorKind::usage);
  auto missing = compare_report_folders(root.file("nope"), root.path());
  ASSERT_FALSE(missing.ok());
  EXPECT_EQ(missing.error().kind, ErrorKind::input);
  EXPECT_NE(missing.error().message().find("nope"), std::string::npos);
}
