// `clipwarden compare` on gate output folders (queue.jsonl + reports), with
// two seeds per prompt, a hostile prompt id, a clip the gate could not read
// and a prompt only B has; then the structure of compare.json key by key and
// the safety of compare.html. Synthetic, invented report values (see
// tests/support/compare_reports.h); the queue lines follow docs/gate.md's
// description of the gate's queue.jsonl.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <random>
#include <set>

#include "support/compare_cli.h"
#include "support/compare_python.h"
#include "support/compare_reports.h"

namespace {

using clipwarden::test::find_compared;
using clipwarden::test::read_json_file;
using clipwarden::test::read_text_file;
using clipwarden::test::run_compare;
using clipwarden::test::TempFolder;
using nlohmann::json;
namespace fs = std::filesystem;
std::string sh(const std::string& s) { return clipwarden::test::shell_quoted(s); }  // for the shell

const std::string kHostilePrompt = "<img src=x onerror=alert(1)>";

std::string prompt_id(int i) { return i == 3 ? kHostilePrompt : "prompt-" + std::to_string(i); }

// One gate folder: `prompts` prompts x 2 seeds, reports under reports/.
void write_gate_folder(const std::string& dir, const std::string& side, int prompts, bool inject,
                       std::mt19937_64& rng,
                       const std::vector<clipwarden::test::PromptLevels>& levels) {
  fs::create_directories(dir + "/reports");
  std::ofstream queue(dir + "/queue.jsonl");
  for (int i = 0; i < prompts; ++i) {
    for (int seed : {1, 2}) {
      const std::string stem = "c" + std::to_string(i) + "_s" + std::to_string(seed);
      const bool injected = inject && i % 2 == 0;
      clipwarden::test::write_synthetic_report(
          clipwarden::test::scenario_clip(rng, levels[i], "clips/" + stem + ".mp4", injected),
          dir + "/reports/" + stem + ".json");
      queue << json{{"id", side + "-" + stem},
                    {"path", "clips/" + stem + ".mp4"},
                    {"verdict", "pass"},
                    {"reasons", json::array()},
                    {"report", "reports/" + stem + ".json"},
                    {"error", nullptr},
                    {"prompt_id", prompt_id(i)},
                    {"model", "ckpt-" + side},
                    {"seed", seed},
                    {"note", "invented test data"}}
                   .dump()
            << "\n";
    }
  }
  if (side == "a")
    queue << json{{"id", "a-broken"},       {"path", "clips/broken.mp4"},
                  {"verdict", nullptr},     {"reasons", json::array()},
                  {"report", nullptr},      {"error", "clips/broken.mp4: not a video file"},
                  {"prompt_id", "prompt-0"}}
                 .dump()
          << "\n";
  if (side == "b") {
    clipwarden::test::write_synthetic_report(
        clipwarden::test::scenario_clip(rng, levels[prompts], "clips/extra.mp4", false),
        dir + "/reports/extra.json");
    queue << json{{"id", "b-extra"},
                  {"path", "clips/extra.mp4"},
                  {"verdict", "pass"},
                  {"reasons", json::array()},
                  {"report", "reports/extra.json"},
                  {"prompt_id", "extra-only-b"},
                  {"seed", 1}}
                 .dump()
          << "\n";
  }
}

struct GateFolders {
  TempFolder root{"compare-gate"};
  std::string a = root.file("A"), b = root.file("B"), out = root.file("out");
  GateFolders() {
    std::mt19937_64 rng(7002);
    const auto levels = clipwarden::test::draw_prompt_levels(rng, 13);
    write_gate_folder(a, "a", 12, false, rng, levels);
    write_gate_folder(b, "b", 12, true, rng, levels);
    std::ofstream(a + "/reports/c0_s1.html") << "<!DOCTYPE html><title>stub page</title>\n";
  }
  std::string args() const { return sh(a) + " " + sh(b) + " --out " + sh(out) + " --quiet"; }
};

std::set<std::string> keys_of(const json& object) {
  std::set<std::string> keys;
  for (const auto& [k, v] : object.items()) keys.insert(k);
  return keys;
}

}  // namespace

TEST(CompareGateFolders, PairsByPromptAveragesSeedsAndListsLeftovers) {
  GateFolders folders;
  ASSERT_EQ(run_compare(folders.args()),
            0);  // the gate's own error is recorded, not an unreadable input
  const json c = read_json_file(folders.out + "/compare.json");
  ASSERT_FALSE(c.is_discarded());
  EXPECT_EQ(c["pair_by"], "prompt_id");
  EXPECT_EQ(c["averaged"], true);
  ASSERT_EQ(c["pairs"].size(), 12u);
  for (const auto& p : c["pairs"]) {
    EXPECT_EQ(p["a_reports"].size(), 2u) << p["key"];
    EXPECT_EQ(p["b_seeds"], json::array({1, 2}));
  }
  ASSERT_EQ(c["unpaired"].size(), 1u);
  EXPECT_EQ(c["unpaired"][0]["side"], "b");
  EXPECT_EQ(c["unpaired"][0]["key"], "extra-only-b");
  ASSERT_EQ(c["failed"].size(), 1u);
  EXPECT_NE(c["failed"][0]["error"].get<std::string>().find("not a video file"), std::string::npos);
  EXPECT_EQ((*find_compared(c, "flicker", "p95"))["unadjusted_better"], "a");
  EXPECT_EQ((*find_compared(c, "drift", "p95"))["unadjusted_better"], "neither");

  // Pairing by report name pairs seed with seed (24 pairs, nothing averaged);
  // by id nothing pairs ("a-..." vs "b-..."), which is bad usage.
  ASSERT_EQ(run_compare(folders.args() + " --pair-by name"), 0);
  const json by_name = read_json_file(folders.out + "/compare.json");
  EXPECT_EQ(by_name["pairs"].size(), 24u);
  EXPECT_EQ(by_name["averaged"], false);
  EXPECT_EQ(run_compare(folders.args() + " --pair-by id"), 2);
}

TEST(CompareGateFolders, CompareJsonStructureKeyByKey) {
  GateFolders folders;
  ASSERT_EQ(run_compare(folders.args() + " --stat p95 --stat max"), 0);
  const json c = read_json_file(folders.out + "/compare.json");
  ASSERT_TRUE(c.is_object());
  EXPECT_EQ(keys_of(c), (std::set<std::string>{"schema", "tool", "inputs", "pair_by", "differences",
                                               "aggregation", "averaged", "most_clips_per_key",
                                               "settings", "headline", "design", "verdicts",
                                               "metrics", "pairs", "unpaired", "failed"}));
  EXPECT_EQ(c["schema"], "clipwarden.compare/1");
  EXPECT_EQ(c["differences"], "B - A");
  EXPECT_EQ(c["settings"]["zero_rule"], "wilcox");

  const std::set<std::string> metric_keys = {
      "metric",    "statistic",   "family",      "n",
      "mean_diff", "median_diff", "ci_low",      "ci_high",
      "p_value",   "p_holm",      "effect_size", "wins_a",
      "wins_b",    "ties",        "better",      "unadjusted_better",
      "direction", "test",        "sign_test",   "seed_spread",
      "bootstrap"};
  std::set<std::string> compared;
  for (const auto& m : c["metrics"]) {
    const std::string key =
        m["metric"].get<std::string>() + "." + m["statistic"].get<std::string>();
    compared.insert(key);
    EXPECT_EQ(keys_of(m), metric_keys) << key;
    EXPECT_TRUE(m["n"].is_number_integer()) << key;
    for (const char* number :
         {"mean_diff", "median_diff", "ci_low", "ci_high", "p_value", "effect_size"})
      EXPECT_TRUE(m[number].is_number()) << key << " " << number;
    EXPECT_LE(m["ci_low"].get<double>(), m["ci_high"].get<double>()) << key;
    // Holm applies within the primary family only.
    if (m["family"] == "primary")
      EXPECT_GE(m["p_holm"].get<double>(), m["p_value"].get<double>()) << key;
    else
      EXPECT_TRUE(m["p_holm"].is_null() && m["better"] == "neither") << key;
    EXPECT_EQ(m["sign_test"]["b_better"], m["wins_b"]) << key;
    EXPECT_EQ(m["sign_test"]["b_worse"], m["wins_a"]) << key;
    // Two seeds per prompt on both sides: the spread is known.
    EXPECT_TRUE(m["seed_spread"]["noise_of_prompt_difference"].is_number()) << key;
    EXPECT_EQ(m["wins_a"].get<int>() + m["wins_b"].get<int>() + m["ties"].get<int>(),
              m["n"].get<int>())
        << key;
    EXPECT_TRUE(m["better"] == "a" || m["better"] == "b" || m["better"] == "neither") << key;
    EXPECT_TRUE(m["test"] == "exact" || m["test"] == "normal" || m["test"] == "none") << key;
    EXPECT_EQ(keys_of(m["bootstrap"]),
              (std::set<std::string>{"method", "statistic", "resamples", "seed", "generator",
                                     "confidence_level"}));
    EXPECT_EQ(m["bootstrap"]["method"], "BCa");
    EXPECT_EQ(m["bootstrap"]["resamples"], 10000);
  }
  // --stat p95 --stat max: both for each per-frame metric, plus coherence and segment counts.
  for (const char* metric : {"warp_error", "flicker", "drift"})
    for (const char* statistic : {"p95", "max", "segment_count"})
      EXPECT_TRUE(compared.count(std::string(metric) + "." + statistic))
          << metric << " " << statistic;
  EXPECT_TRUE(compared.count("coherence.score"));
  EXPECT_TRUE(compared.count("verdict.pass_share"));
  EXPECT_TRUE(compared.count("verdict.reject_share"));
  EXPECT_EQ(c["design"]["prompts"], 12);
  EXPECT_EQ(c["design"]["primary_family_size"], 3);
  EXPECT_TRUE(c["headline"].is_array() && !c["headline"].empty());
  EXPECT_EQ(c["verdicts"]["prompts"]["both_pass"].get<int>() +
                c["verdicts"]["prompts"]["only_a_passes"].get<int>() +
                c["verdicts"]["prompts"]["only_b_passes"].get<int>() +
                c["verdicts"]["prompts"]["neither_passes"].get<int>(),
            12);
  EXPECT_FALSE(compared.count("flicker.mean"));

  for (const auto& p : c["pairs"]) {
    EXPECT_EQ(keys_of(p), (std::set<std::string>{"key", "a_reports", "b_reports", "a_seeds",
                                                 "b_seeds", "values"}));
    EXPECT_EQ(p["values"].size(), c["metrics"].size());
    for (const auto& [key, v] : p["values"].items())
      EXPECT_EQ(keys_of(v), (std::set<std::string>{"a", "b"}));
  }
  for (const auto& u : c["unpaired"])
    EXPECT_EQ(keys_of(u), (std::set<std::string>{"side", "key", "reports", "reason"}));
  for (const auto& f : c["failed"])
    EXPECT_EQ(keys_of(f), (std::set<std::string>{"side", "path", "error"}));
}

TEST(CompareGateFolders, PageIsSelfContainedAndEscapesInputs) {
  GateFolders folders;
  ASSERT_EQ(run_compare(folders.args()), 0);
  const std::string page = read_text_file(folders.out + "/compare.html");
  ASSERT_FALSE(page.empty());
  EXPECT_EQ(page.find("<script"), std::string::npos);
  EXPECT_EQ(page.find("http://"), std::string::npos);
  EXPECT_EQ(page.find("https://"), std::string::npos);
  EXPECT_NE(page.find("http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'"),
            std::string::npos);
  EXPECT_EQ(page.find(kHostilePrompt), std::string::npos);
  EXPECT_NE(page.find("&lt;img src=x onerror=alert(1)&gt;"), std::string::npos);
  EXPECT_NE(page.find("<svg class=\"dots\""), std::string::npos);
  // Links to both clips' reports, relative to the output folder: the page
  // beside A's report where one exists, B's JSON otherwise.
  EXPECT_NE(page.find("href=\"../A/reports/c0_s1.html\""), std::string::npos);
  EXPECT_NE(page.find("href=\"../B/reports/c0_s1.json\""), std::string::npos);
}

TEST(CompareGateFolders, UnreadableReportIsListedAndExitsThree) {
  GateFolders folders;
  std::ofstream(folders.b + "/reports/c5_s2.json") << "{ not json";
  EXPECT_EQ(run_compare(folders.args() + " --fail-if-worse flicker"), 3);  // 3 outranks 1
  const json c = read_json_file(folders.out + "/compare.json");
  ASSERT_FALSE(c.is_discarded());
  bool listed = false;
  for (const auto& f : c["failed"])
    listed |= f["path"].get<std::string>().find("c5_s2.json") != std::string::npos;
  EXPECT_TRUE(listed);
  EXPECT_EQ(c["pairs"].size(), 12u);  // prompt-5 still pairs through its other seed
}
