// The compare engine (compare_report_folders) on reports whose summary
// values are chosen by hand (constant invented series), so every number in
// the result can be worked out on paper.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <random>
#include <tuple>

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
  // Flicker is not in the default primary family: exploratory, no verdict,
  // no Holm adjustment, but the unadjusted reading and the sign test.
  EXPECT_FALSE(flicker.primary);
  EXPECT_EQ(flicker.better, "neither");
  EXPECT_EQ(flicker.unadjusted_better, "a");
  EXPECT_TRUE(std::isnan(flicker.p_holm));
  EXPECT_NEAR(flicker.sign_p_value, 2.0 / 256, 1e-15);  // 0 of 8 better in B
  EXPECT_EQ(flicker.b_better_share, 0.0);
  EXPECT_EQ(flicker.b_better_low, 0.0);
  EXPECT_NEAR(flicker.b_better_high, 1 - std::pow(0.025, 1.0 / 8),
              1e-12);  // Clopper-Pearson, k = 0
  for (size_t i = 0; i < c.pairs.size(); ++i) {
    const auto k = static_cast<double>(i + 1);
    const size_t column = &flicker - c.metrics.data();
    EXPECT_NEAR(c.pairs[i].a_values[column], 0.02 * k, 1e-15);  // the two seeds averaged
  }
  // Seeds: A's two clips of prompt k differ by 0.02k, so the within-prompt
  // variance is (0.02k)^2 / 2; pooled over k = 1..8 with one degree of
  // freedom each: 0.0002 * mean(k^2) = 0.0002 * 25.5. B has one clip per
  // prompt: no spread known, so no noise figure.
  EXPECT_NEAR(flicker.seed_sd_a, std::sqrt(0.0002 * 25.5), 1e-12);
  EXPECT_TRUE(std::isnan(flicker.seed_sd_b));
  EXPECT_TRUE(std::isnan(flicker.seed_noise));
  EXPECT_EQ(c.most_clips_per_key, 2);

  const auto& coherence = find(c, "coherence.score");
  EXPECT_TRUE(coherence.primary);
  EXPECT_DOUBLE_EQ(coherence.p_value, 2.0 / 256);
  EXPECT_EQ(coherence.better, "a");  // lower coherence in B: worse
  EXPECT_EQ(coherence.what.direction, "higher coherence is better");
  // Every clip passes on both sides: the verdict shares never change, so
  // they are primary but untested, and the Holm family is coherence alone.
  for (const char* key : {"verdict.pass_share", "verdict.reject_share"}) {
    EXPECT_TRUE(find(c, key).primary) << key;
    EXPECT_FALSE(find(c, key).in_holm_family) << key;
  }
  EXPECT_DOUBLE_EQ(coherence.p_holm, 2.0 / 256);
  EXPECT_EQ(c.verdicts.both_pass, 8);
  EXPECT_EQ(c.verdicts.clips_a[0], 16);
  EXPECT_EQ(c.verdicts.test, "none");

  // drift and every segment count: no non-zero difference, no test.
  for (const char* key : {"drift.p95", "flicker.segment_count", "drift.segment_count"}) {
    const auto& m = find(c, key);
    EXPECT_EQ(m.test, "none") << key;
    EXPECT_EQ(m.p_value, 1.0) << key;
    EXPECT_EQ(m.ties, 8) << key;
    EXPECT_EQ(m.better, "neither") << key;
    EXPECT_EQ(m.unadjusted_better, "neither") << key;
  }
  const auto& warp = find(c, "warp_error.p95");
  EXPECT_GT(warp.p_value, 0.05);
  EXPECT_EQ(warp.unadjusted_better, "neither");
  EXPECT_EQ(warp.wins_a + warp.wins_b, 8);

  // What 8 prompts can show with the default family of 3: the smallest p is
  // 2/256 = 0.0078, Holm's first step makes it 3 * 2/256 = 0.0234 < 0.05.
  // 3 * 2/2^n drops below 0.05 from n = 7 (0.047; n = 6 gives 0.094), and
  // one test alone from n = 6 (2/64 = 0.031; n = 5 gives 0.0625).
  EXPECT_EQ(c.design.prompts, 8);
  EXPECT_EQ(c.design.primary_family, 3);
  EXPECT_DOUBLE_EQ(c.design.smallest_p, 2.0 / 256);
  EXPECT_DOUBLE_EQ(c.design.smallest_holm_p, 6.0 / 256);
  EXPECT_TRUE(c.design.primary_can_reach);
  EXPECT_EQ(c.design.prompts_needed_primary, 7);
  EXPECT_EQ(c.design.prompts_needed_single, 6);

  // Naming flicker primary makes it a verdict; Holm over {flicker p95} alone.
  CompareOptions flicker_primary;
  flicker_primary.primary = {"flicker:p95"};
  auto named = compare_report_folders(a, b, flicker_primary);
  ASSERT_TRUE(named.ok()) << named.error().message();
  const auto& f = find(*named, "flicker.p95");
  EXPECT_TRUE(f.primary);
  EXPECT_EQ(f.better, "a");
  EXPECT_DOUBLE_EQ(f.p_holm, 2.0 / 256);
  EXPECT_FALSE(find(*named, "coherence.score").primary);
  EXPECT_EQ(find(*named, "coherence.score").better, "neither");
  EXPECT_EQ(named->design.primary_family, 1);

  // A family too large for 8 prompts: 27 statistics need 27 * 2/2^n < 0.05,
  // i.e. 2^n > 1080, n >= 11.
  EXPECT_EQ(design_limits_for(8, 27, 0.05).prompts_needed_primary, 11);
  EXPECT_FALSE(design_limits_for(8, 27, 0.05).primary_can_reach);
  EXPECT_TRUE(design_limits_for(8, 27, 0.05).single_test_can_reach);
  EXPECT_FALSE(design_limits_for(5, 1, 0.05).single_test_can_reach);  // 2/32 = 0.0625

  // A name that matches nothing is bad usage, not an empty family.
  CompareOptions unknown;
  unknown.primary = {"no_such_metric"};
  auto refused = compare_report_folders(a, b, unknown);
  ASSERT_FALSE(refused.ok());
  EXPECT_EQ(refused.error().kind, ErrorKind::usage);
}

TEST(CompareEngine, NamesOfStatistics) {
  const ComparedStatistic p95{"flicker", "p95", false, ""};
  const ComparedStatistic segments{"flicker", "segment_count", false, ""};
  EXPECT_TRUE(p95.named_by("flicker"));
  EXPECT_TRUE(p95.named_by("flicker.p95"));
  EXPECT_TRUE(p95.named_by("flicker:p95"));
  EXPECT_FALSE(p95.named_by("flicker:max"));
  EXPECT_FALSE(p95.named_by("flick"));
  EXPECT_FALSE(p95.named_by("flicker_local"));
  EXPECT_FALSE(segments.named_by("flicker"));  // segment counts only by their full name
  EXPECT_TRUE(segments.named_by("flicker.segment_count"));
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

TEST(CompareEngine, MoreSeedNoiseAloneIsNoDifference) {
  // 24 prompts, 3 seeds each on both sides. Every clip's level is its
  // prompt's level times (1 + e), e uniform with standard deviation 0.02 in A
  // and 0.08 in B: B only varies more from seed to seed, its average is the
  // same. The coherence score follows flicker (100 - 500 flicker).
  test::TempFolder root("compare-seeds");
  const std::string a = root.file("A"), b = root.file("B");
  std::filesystem::create_directories(a);
  std::filesystem::create_directories(b);
  std::mt19937_64 rng(424242);
  auto noise = [&](double sd) {  // uniform on [-sqrt(3) sd, sqrt(3) sd]
    return (2 * (static_cast<double>(rng() >> 11) * 0x1.0p-53) - 1) * std::sqrt(3.0) * sd;
  };
  std::FILE* qa = std::fopen((a + "/queue.jsonl").c_str(), "w");
  std::FILE* qb = std::fopen((b + "/queue.jsonl").c_str(), "w");
  for (int k = 0; k < 24; ++k) {
    const double level = 0.01 + 0.002 * k;
    for (int seed = 1; seed <= 3; ++seed)
      for (auto [dir, sd, queue] : {std::tuple{a, 0.02, qa}, std::tuple{b, 0.08, qb}}) {
        const double flicker = level * (1 + noise(sd));
        const std::string name = "p" + std::to_string(k) + "_s" + std::to_string(seed);
        test::write_synthetic_report(constant_clip(flicker, 0.02, 1.0, 100 - 500 * flicker),
                                     dir + "/" + name + ".json");
        std::fprintf(queue,
                     "{\"id\":\"%s\",\"report\":\"%s.json\",\"prompt_id\":\"p%d\",\"seed\":%d}\n",
                     name.c_str(), name.c_str(), k, seed);
      }
  }
  std::fclose(qa);
  std::fclose(qb);
  auto result = compare_report_folders(a, b);
  ASSERT_TRUE(result.ok()) << result.error().message();
  const Comparison& c = *result;
  EXPECT_EQ(c.most_clips_per_key, 3);
  for (const auto& m : c.metrics) {
    EXPECT_EQ(m.better, "neither") << m.what.key();  // no false "better" or "worse"
    if (m.what.key() == "flicker.p95" || m.what.key() == "coherence.score")
      EXPECT_EQ(m.n, 24) << "prompts, not clips, are the unit";
  }
  const auto& flicker = find(c, "flicker.p95");
  // The pooled within-prompt spread shows the four-fold noise of B (each
  // side's estimate has 48 degrees of freedom; the ratio of the true spreads
  // is 4, the prompt levels vary it a little).
  EXPECT_GT(flicker.seed_sd_b / flicker.seed_sd_a, 2.5);
  EXPECT_LT(flicker.seed_sd_b / flicker.seed_sd_a, 6.0);
  // Three clips per prompt on both sides: a prompt's difference of means
  // has seed variance sd_a^2 / 3 + sd_b^2 / 3.
  EXPECT_NEAR(flicker.seed_noise,
              std::sqrt(flicker.seed_sd_a * flicker.seed_sd_a / 3 +
                        flicker.seed_sd_b * flicker.seed_sd_b / 3),
              1e-12);
  EXPECT_LT(std::fabs(flicker.mean_diff), flicker.seed_noise);
  bool said = false;
  for (const auto& s : headline_sentences(c))
    said |= s.find("coherence score") != std::string::npos &&
            s.find("within the noise of sampling seeds") != std::string::npos;
  EXPECT_TRUE(said);
}
