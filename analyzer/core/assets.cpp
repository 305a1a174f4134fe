#include "analyzer/core/assets.h"

#include <utility>

namespace clipwarden {
namespace embedded {
extern const std::pair<std::string_view, std::string_view> kAssets[];
}

std::string_view asset(std::string_view name) {
  for (int i = 0; !embedded::kAssets[i].first.empty(); ++i)
    if (embedded::kAssets[i].first == name) return embedded::kAssets[i].second;
  return {};
}
}  // namespace clipwarden
