#pragma once

namespace clipwarden {
// The tool version written into every report (`tool.version`) and into the
// results store, so results from different versions are never mixed up.
const char* version();
}  // namespace clipwarden
