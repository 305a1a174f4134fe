#include "report/html/csp.h"

#include <cstdint>
#include <memory>

extern "C" {
#include <libavutil/mem.h>
#include <libavutil/sha.h>
}

#include "report/html/html_escape.h"

namespace clipwarden {

std::string csp_hash_source(std::string_view text) {
  std::unique_ptr<AVSHA, decltype(&av_free)> sha(av_sha_alloc(), &av_free);
  uint8_t digest[32] = {};
  if (sha && av_sha_init(sha.get(), 256) == 0) {
    av_sha_update(sha.get(), reinterpret_cast<const uint8_t*>(text.data()), text.size());
    av_sha_final(sha.get(), digest);
  }
  return "'sha256-" + base64_encode({reinterpret_cast<const char*>(digest), sizeof digest}) + "'";
}

std::string content_security_policy(std::string_view style_text, std::string_view script_text) {
  return "default-src 'none'; img-src data:; style-src " + csp_hash_source(style_text) +
         "; script-src " + csp_hash_source(script_text) + "; base-uri 'none'; form-action 'none'";
}

}  // namespace clipwarden
