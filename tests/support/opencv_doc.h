// opencv-doc's sample clips: real camera footage Debian ships under
// /usr/share/doc/opencv-doc. The hand-held box.mp4 and cup.mp4 come gzipped
// (as documentation assets); tests and the accuracy set unpack them here.
#pragma once

#include <string>

namespace clipwarden::test {

// opencv-doc's folder of gzipped documentation clips (box.mp4.gz, cup.mp4.gz).
inline constexpr const char* kOpencvDocHtml = "/usr/share/doc/opencv-doc/opencv4/html";

// `name` (e.g. "box.mp4") unpacked from kOpencvDocHtml/<name>.gz into
// `folder`, or "" when the package or gzip is missing or unpacking fails. An
// earlier copy in `folder` is reused; a half-written one never is (the copy
// is written beside it and renamed).
std::string unpacked_opencv_doc_clip(const std::string& folder, const std::string& name);

}  // namespace clipwarden::test
