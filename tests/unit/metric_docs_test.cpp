// The README's metric table and docs/metrics.md's reference say what the
// registry says: each document holds, between its markers, exactly what
// `clipwarden metrics --markdown` / `--reference` print from the
// descriptors. A metric added, renamed or redescribed without updating the
// documents fails here (the message says which command regenerates them).
#include <gtest/gtest.h>

#include "analyzer/cli/metric_listing.h"
#include "support/source_files.h"

namespace {

using clipwarden::test::read_source_file;

// The text between the line "<!-- NAME: begin -->" and "<!-- NAME: end -->".
std::string between_markers(const std::string& text, const std::string& name) {
  const std::string begin = "<!-- " + name + ": begin -->\n", end = "<!-- " + name + ": end -->";
  const size_t a = text.find(begin);
  if (a == std::string::npos) return "(no begin marker)";
  const size_t b = text.find(end, a);
  if (b == std::string::npos) return "(no end marker)";
  return text.substr(a + begin.size(), b - a - begin.size());
}

}  // namespace

TEST(MetricDocs, ReadmeTableMatchesTheRegistry) {
  EXPECT_EQ(between_markers(read_source_file("README.md"), "metric table"),
            clipwarden::cli::metric_table_markdown())
      << "regenerate with: build/clipwarden metrics --markdown";
}

TEST(MetricDocs, ReferenceMatchesTheRegistry) {
  EXPECT_EQ(between_markers(read_source_file("docs/metrics.md"), "metrics reference"),
            clipwarden::cli::metric_reference_markdown())
      << "regenerate with: build/clipwarden metrics --reference";
}
