// Temporary until the decoder lands: every entry point reports an error.
#include "framelint/clip_source.h"

namespace framelint {
Expected<std::unique_ptr<ClipSource>> ClipSource::open(const std::string& path, const SourceOptions&) {
  return input_error(path, "decoder not built yet");
}
Expected<nlohmann::json> probe_clip(const std::string& path, const SourceOptions&) {
  return input_error(path, "decoder not built yet");
}
Expected<std::string> sha256_file(const std::string& path) { return input_error(path, "not built yet"); }
}  // namespace framelint
