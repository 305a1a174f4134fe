#include "analyzer/cli/output_names.h"

#include <filesystem>

namespace framelint::cli {

std::string safe_stem(const std::string& clip_path) {
  std::filesystem::path p(clip_path);
  std::string stem = p.has_stem() ? p.stem().string() : p.filename().string();
  if (stem.empty() || stem == "." || stem == "..") stem = p.parent_path().filename().string();
  std::string out;
  for (unsigned char c : stem) {
    const bool keep = (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') ||
                      c == '-' || c == '_' || c == '.' || c >= 0x80;  // keep UTF-8 bytes
    out.push_back(keep ? static_cast<char>(c) : '_');
  }
  while (!out.empty() && out.front() == '.') out.erase(out.begin());
  if (out.empty()) out = "clip";
  if (out.size() > 120) out.resize(120);
  return out;
}

std::string OutputNamer::unique_name(const std::string& clip_path) {
  const std::string stem = safe_stem(clip_path);
  std::string name = stem;
  for (int n = 2; used_.count(name); ++n) name = stem + "-" + std::to_string(n);
  used_.insert(name);
  return name;
}

}  // namespace framelint::cli
