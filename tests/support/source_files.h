// Reading the repository's own files (README, docs, schemas) from a test,
// for the checks that documents agree with the code.
#pragma once

#include <string>

namespace clipwarden::test {

// The text of `relative` (e.g. "docs/cli.md") under the source tree; "" when
// it cannot be read.
std::string read_source_file(const std::string& relative);

}  // namespace clipwarden::test
