// The pieces of `clipwarden compare` that are our own contract (docs/compare.md's
// compare.json fields, HTML escaping rules of the HTML 5 spec for text and
// attribute values, RFC 3986 percent-encoding): escaping, the values read
// from a report, and the page for edge cases.
#include <gtest/gtest.h>

#include <cmath>

#include "analyzer/compare/report_folder.h"
#include "clipwarden/compare.h"
#include "report/html/html_escape.h"

using namespace clipwarden;

TEST(HtmlEscape, TextAndAttributes) {
  EXPECT_EQ(html_escape("<img src=x onerror=alert(1)>"), "&lt;img src=x onerror=alert(1)&gt;");
  EXPECT_EQ(html_escape("a&b \"q\" 'r'"), "a&amp;b &quot;q&quot; &#39;r&#39;");
  EXPECT_EQ(html_escape("plain text"), "plain text");
}

TEST(HtmlEscape, HrefCannotCloseTheAttributeOrStartAScheme) {
  EXPECT_EQ(url_escape_path("../A/reports/c0_s1.html"), "../A/reports/c0_s1.html");
  EXPECT_EQ(url_escape_path("javascript:alert(1)"), "javascript%3Aalert%281%29");
  EXPECT_EQ(url_escape_path("a \"b\".json"), "a%20%22b%22.json");
  EXPECT_EQ(url_escape_path("caf\xC3\xA9"), "caf%C3%A9");
}

TEST(ComparableValues, SummarySegmentsAndCoherence) {
  Report r;
  r.summary.coherence = 81.5;
  r.summary.metrics.push_back({"flicker", 0.1, 0.08, 0.3, 0.5});
  r.summary.metrics.push_back({"drift", 1.0, 0.9, kUndefined, 2.0});
  r.summary.details["flash"] = {{"hazard", false}};
  Segment s;
  s.metric = "flicker";
  r.segments = {s, s};
  const auto values = compare_detail::comparable_values(r);
  auto get = [&](const std::string& key) {
    for (const auto& [k, v] : values)
      if (k == key) return v;
    return std::nan("");
  };
  EXPECT_EQ(get("coherence.score"), 81.5);
  EXPECT_EQ(get("flicker.p95"), 0.3);
  EXPECT_EQ(get("flicker.segment_count"), 2);
  EXPECT_EQ(get("drift.segment_count"), 0);
  EXPECT_EQ(get("flash.segment_count"), 0);   // known through its details
  EXPECT_TRUE(std::isnan(get("drift.p95")));  // undefined values are left out
  EXPECT_TRUE(std::isnan(get("coherence.segment_count")));
}

TEST(ComparePage, EmptyComparisonStillRenders) {
  Comparison c;
  c.a_dir = "<a>";
  c.b_dir = "b";
  const std::string page = comparison_to_html(c, "out");
  EXPECT_NE(page.find("&lt;a&gt;"), std::string::npos);
  EXPECT_EQ(page.find("<a>"), std::string::npos);
  EXPECT_NE(page.find("</html>"), std::string::npos);
  const auto json = comparison_to_json(c);
  EXPECT_EQ(json["schema"], "clipwarden.compare/1");
  EXPECT_TRUE(json["metrics"].empty());
}

TEST(CompareOptions, NamesAreTheDocumentedOnes) {
  // --pair-by as docs/compare.md spells it; --zero-rule as scipy.stats.wilcoxon
  // names its zero_method values ("wilcox", "pratt", "zsplit").
  const std::vector<std::pair<const char*, PairBy>> pair_by = {
      {"id", PairBy::id}, {"prompt_id", PairBy::prompt_id}, {"name", PairBy::name}};
  for (const auto& [name, p] : pair_by) {
    EXPECT_STREQ(to_string(p), name);
    EXPECT_EQ(pair_by_from_string(name), p) << name;
  }
  EXPECT_FALSE(pair_by_from_string("automatic").has_value());
  const std::vector<std::pair<const char*, ZeroRule>> zero_rules = {
      {"wilcox", ZeroRule::wilcox}, {"pratt", ZeroRule::pratt}, {"zsplit", ZeroRule::zsplit}};
  for (const auto& [name, z] : zero_rules) {
    EXPECT_STREQ(to_string(z), name);
    EXPECT_EQ(zero_rule_from_string(name), z) << name;
  }
  EXPECT_FALSE(zero_rule_from_string("Pratt").has_value());
}
