#include "report/html/csp.h"

#include "analyzer/core/sha256.h"
#include "report/html/html_escape.h"

namespace clipwarden {

std::string csp_hash_source(std::string_view text) {
  Sha256 sha;
  sha.update(text);
  const auto digest = sha.digest();
  return "'sha256-" + base64_encode({reinterpret_cast<const char*>(digest.data()), digest.size()}) +
         "'";
}

std::string content_security_policy(std::string_view style_text, std::string_view script_text) {
  return "default-src 'none'; img-src data:; style-src " + csp_hash_source(style_text) +
         "; script-src " + csp_hash_source(script_text) + "; base-uri 'none'; form-action 'none'";
}

}  // namespace clipwarden
