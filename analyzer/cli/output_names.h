// Output file names derived from input paths: the clip's file name without
// extension, reduced to safe characters so a hostile name can never escape
// the output folder, and made unique within one run.
#pragma once

#include <set>
#include <string>

namespace clipwarden::cli {

// "shots/take 01.mp4" -> "take_01"; never empty, never "." or "..", no '/'.
std::string safe_stem(const std::string& clip_path);

class OutputNamer {
 public:
  // safe_stem, with "-2", "-3", ... appended when the stem was used before.
  std::string unique_name(const std::string& clip_path);

 private:
  std::set<std::string> used_;
};

}  // namespace clipwarden::cli
