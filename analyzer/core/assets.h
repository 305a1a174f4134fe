// Files from report/assets and report/schema, compiled into the library by
// cmake/EmbedAssets.cmake so the binary needs no data files at run time.
#pragma once

#include <string_view>

namespace clipwarden {
// The bytes of an embedded file by its name (e.g. "report.css"); empty if
// there is no such asset.
std::string_view asset(std::string_view name);
}  // namespace clipwarden
