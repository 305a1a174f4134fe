#include "support/opencv_doc.h"

#include <cstdlib>
#include <filesystem>

#include "support/clips.h"

namespace clipwarden::test {

std::string unpacked_opencv_doc_clip(const std::string& folder, const std::string& name) {
  namespace fs = std::filesystem;
  const std::string gz = std::string(kOpencvDocHtml) + "/" + name + ".gz";
  const std::string out = folder + "/" + name;
  if (fs::exists(out)) return out;
  if (!fs::exists(gz) || !have_tool("gzip")) return "";
  std::error_code ec;
  fs::create_directories(folder, ec);
  const std::string part = out + ".part";
  if (std::system(("gzip -dc '" + gz + "' > '" + part + "'").c_str()) != 0) {
    fs::remove(part, ec);
    return "";
  }
  fs::rename(part, out, ec);
  return ec ? "" : out;
}

}  // namespace clipwarden::test
