// Running the built `clipwarden compare` from a test and reading its output.
#pragma once

#include <string>

#include <nlohmann/json.hpp>

namespace clipwarden::test {

// Runs `clipwarden compare ARGUMENTS` (output discarded); the exit status.
int run_compare(const std::string& arguments);
// 'text' quoted for the shell (the test paths hold no single quote).
std::string shell_quoted(const std::string& text);
nlohmann::json read_json_file(const std::string& path);  // discarded on failure
std::string read_text_file(const std::string& path);
// The metrics[] entry of compare.json for metric.statistic, or nullptr.
const nlohmann::json* find_compared(const nlohmann::json& compare, const std::string& metric,
                                    const std::string& statistic);

}  // namespace clipwarden::test
