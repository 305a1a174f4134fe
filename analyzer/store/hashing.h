// The keys of the results store: content and settings hashes (SHA-256,
// analyzer/core/sha256.h).
#pragma once

#include <string>
#include <string_view>

#include "clipwarden/analysis.h"
#include "clipwarden/error.h"
#include "clipwarden/policy.h"

namespace clipwarden {

// Hex SHA-256 of a byte string.
std::string sha256_hex(std::string_view bytes);

// The store's content key of a clip: the SHA-256 of a file's bytes, or for a
// folder of frames the SHA-256 of "<name> <sha256 of file>\n" over its
// files in name order. Errors name the path.
Expected<std::string> content_sha256(const std::string& clip_path);

// SHA-256 of the canonical settings JSON (threads left out: they do not
// change results), the canonical policy JSON and the tool version.
std::string settings_hash(const AnalysisSettings& settings, const Policy& policy);

}  // namespace clipwarden
