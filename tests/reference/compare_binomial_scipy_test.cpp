// The sign test, its exact interval and McNemar's exact test of `clipwarden
// compare` against scipy.stats.binomtest (Debian python3-scipy, run through
// /usr/bin/python3):
// - the two-sided sign test p of k of n against binomtest(k, n, 0.5).pvalue;
// - the Clopper-Pearson interval against
//   binomtest(k, n).proportion_ci(confidence_level, method='exact');
// - McNemar's exact test, through the whole engine on report folders whose
//   verdicts make a chosen 2 x 2 table, against binomtest on the discordant
//   prompts (McNemar's exact test is that binomial test).
// Tolerances: p-values 1e-12 absolute (sums of the same binomial terms);
// interval ends 1e-9 absolute (ours bisects on the binomial tails, scipy
// inverts the beta distribution).
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>

#include "analyzer/compare/binomial_tests.h"
#include "clipwarden/compare.h"
#include "support/compare_python.h"
#include "support/compare_reports.h"

namespace {

namespace st = clipwarden::stats;

constexpr const char* kBinomScript = R"PY(
import json, sys
from scipy import stats
cases = json.load(open(sys.argv[1]))
out = []
for k, n, level in cases:
    r = stats.binomtest(k, n, 0.5)
    ci = stats.binomtest(k, n).proportion_ci(confidence_level=level, method="exact")
    out.append([float(r.pvalue), float(ci.low), float(ci.high)])
print(json.dumps(out))
)PY";

nlohmann::json scipy_binomtest(const nlohmann::json& cases) {
  std::string error;
  auto reference = clipwarden::test::run_python_json(kBinomScript, cases, error);
  EXPECT_FALSE(reference.is_discarded()) << error;
  return reference;
}

}  // namespace

TEST(BinomialAgainstScipy, SignTestAndClopperPearson) {
  if (auto why = clipwarden::test::scipy_unavailable_reason()) GTEST_SKIP() << *why;
  nlohmann::json cases = nlohmann::json::array();
  // Every outcome of small studies; a spread of k for larger ones (a few
  // hundred prompts) and other levels. (scipy takes ~7 ms of CPU per case.)
  for (int n = 1; n <= 20; ++n)
    for (int k = 0; k <= n; ++k) cases.push_back({k, n, 0.95});
  for (int n : {27, 40, 57, 120, 333, 800})
    for (int k : {0, 1, n / 10, n / 3, n / 2, n / 2 + 1, n - 7, n})
      for (double level : {0.9, 0.95, 0.99}) cases.push_back({k, n, level});
  const auto reference = scipy_binomtest(cases);
  ASSERT_EQ(reference.size(), cases.size());
  double worst_p = 0, worst_ci = 0;
  for (size_t i = 0; i < cases.size(); ++i) {
    const int k = cases[i][0], n = cases[i][1];
    const double level = cases[i][2];
    const double p = st::binomial_test_half(k, n);
    const auto ci = st::clopper_pearson(k, n, level);
    const double dp = std::fabs(p - reference[i][0].get<double>());
    const double dci = std::max(std::fabs(ci.low - reference[i][1].get<double>()),
                                std::fabs(ci.high - reference[i][2].get<double>()));
    EXPECT_LE(dp, 1e-12) << k << " of " << n;
    EXPECT_LE(dci, 1e-9) << k << " of " << n << " at " << level;
    worst_p = std::max(worst_p, dp);
    worst_ci = std::max(worst_ci, dci);
  }
  std::printf("binomial vs scipy: %zu cases, worst |dp| %.3g, worst interval end %.3g\n",
              cases.size(), worst_p, worst_ci);
}

TEST(McNemarAgainstScipy, VerdictTableThroughTheEngine) {
  if (auto why = clipwarden::test::scipy_unavailable_reason()) GTEST_SKIP() << *why;
  using clipwarden::Verdict;
  // Tables (both pass, only A passes, only B passes, neither passes).
  const std::vector<std::array<int, 4>> tables = {
      {3, 8, 0, 1}, {10, 2, 7, 5}, {0, 12, 1, 0}, {5, 0, 0, 4}, {20, 9, 3, 8}};
  nlohmann::json cases = nlohmann::json::array();
  std::vector<clipwarden::VerdictComparison> ours;
  for (size_t t = 0; t < tables.size(); ++t) {
    clipwarden::test::TempFolder root("mcnemar");
    const std::string a = root.file("A"), b = root.file("B");
    std::filesystem::create_directories(a);
    std::filesystem::create_directories(b);
    int prompt = 0;
    for (int cell = 0; cell < 4; ++cell)
      for (int i = 0; i < tables[t][cell]; ++i, ++prompt) {
        clipwarden::test::SyntheticClip clip;
        clip.clip_path = "clip.mp4";
        clip.series["flicker"] = std::vector<double>(6, 0.01 * (prompt + 1));
        // A passes in cells 0 and 1; B in cells 0 and 2. The rest reject
        // (A) or need review (B), both "not pass".
        clip.verdict = cell <= 1 ? Verdict::pass : Verdict::reject;
        clipwarden::test::write_synthetic_report(clip, a + "/p" + std::to_string(prompt) + ".json");
        clip.verdict = cell == 0 || cell == 2 ? Verdict::pass : Verdict::review;
        clipwarden::test::write_synthetic_report(clip, b + "/p" + std::to_string(prompt) + ".json");
      }
    auto result = clipwarden::compare_report_folders(a, b);
    ASSERT_TRUE(result.ok()) << result.error().message();
    ours.push_back(result->verdicts);
    const int discordant = tables[t][1] + tables[t][2];
    // scipy refuses n = 0; that table is checked without it below.
    cases.push_back({tables[t][2], std::max(discordant, 1), 0.95});
  }
  const auto reference = scipy_binomtest(cases);
  ASSERT_EQ(reference.size(), cases.size());
  for (size_t t = 0; t < tables.size(); ++t) {
    const auto& v = ours[t];
    EXPECT_EQ(v.both_pass, tables[t][0]);
    EXPECT_EQ(v.only_a_pass, tables[t][1]);
    EXPECT_EQ(v.only_b_pass, tables[t][2]);
    EXPECT_EQ(v.neither_pass, tables[t][3]);
    if (tables[t][1] + tables[t][2] == 0) {
      EXPECT_EQ(v.test, "none");  // no discordant prompt: nothing to test
      EXPECT_EQ(v.p_value, 1.0);
      continue;
    }
    EXPECT_EQ(v.test, "exact");
    EXPECT_NEAR(v.p_value, reference[t][0].get<double>(), 1e-12) << "table " << t;
  }
}
