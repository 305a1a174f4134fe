#include "support/corpus.h"

#include <cstdlib>
#include <filesystem>

namespace clipwarden::test {

std::string corpus_clip(const std::string& file) {
  const char* root = std::getenv("CLIPWARDEN_CORPUS");
  if (!root || !*root) return {};
  const std::filesystem::path path = std::filesystem::path(root) / "clips" / file;
  std::error_code ec;
  return std::filesystem::is_regular_file(path, ec) ? path.string() : std::string();
}

}  // namespace clipwarden::test
