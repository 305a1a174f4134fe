// Reading JSON text from a file the tool did not write itself (a policy, a
// manifest line, a report, a queue line): one parser for all of them, with
// the same limits. nlohmann-json parses without recursion, but copying,
// merging and destroying a document recurse once per level, so a file of
// 60,000 nested objects would overflow the stack later on; nesting is
// therefore capped while parsing. A key given twice in one object is
// refused too: which of the two values counts is not defined by RFC 8259,
// so a policy or manifest that repeats a key does not say what it means.
#pragma once

#include <string>
#include <string_view>

#include <nlohmann/json.hpp>

#include "clipwarden/error.h"

namespace clipwarden {

// Deeper than any document the tool reads or writes needs (a report's
// deepest value is 5 levels down), far below what exhausts a stack.
constexpr int kMaxJsonDepth = 64;

// The parsed value, or an Error of `kind` naming `subject` and the cause
// ("is not valid JSON (error at byte 12)", "nests deeper than 64 levels",
// "repeats the key \"id\"").
Expected<nlohmann::json> parse_json_text(std::string_view text, const std::string& subject,
                                         ErrorKind kind);

}  // namespace clipwarden
