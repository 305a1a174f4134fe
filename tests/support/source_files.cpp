#include "support/source_files.h"

#include <fstream>
#include <sstream>

namespace clipwarden::test {

std::string read_source_file(const std::string& relative) {
  std::ifstream in(std::string(CLIPWARDEN_SOURCE_DIR) + "/" + relative);
  std::stringstream text;
  text << in.rdbuf();
  return text.str();
}

}  // namespace clipwarden::test
