// The registered metrics as `clipwarden metrics` prints them: plain text for
// a person, JSON for a program, and the two Markdown forms the README's
// metric table and docs/metrics.md carry (a test checks both documents
// against these, so they cannot drift from the registry).
#pragma once

#include <string>

#include <nlohmann/json.hpp>

namespace clipwarden::cli {

std::string metric_listing_text();
nlohmann::ordered_json metric_listing_json();
// | column | metric | unit | better | frame rate | what it measures |
std::string metric_table_markdown();
// Per metric: its citation and a table of its columns with unit, direction,
// frame-rate dependence (flag and words) and default rules.
std::string metric_reference_markdown();

}  // namespace clipwarden::cli
