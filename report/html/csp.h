// The page's Content-Security-Policy: nothing may load from anywhere; only
// data: images and the page's own inline style and script (named by their
// SHA-256 hashes, CSP Level 2 "hash-source") may apply or run.
#pragma once

#include <string>
#include <string_view>

namespace clipwarden {

// "'sha256-<base64 of SHA-256(text)>'", the CSP source for an inline block
// whose exact text (between the tags) is `text`.
std::string csp_hash_source(std::string_view text);

// The policy for a page with one inline <style> and one inline <script>.
std::string content_security_policy(std::string_view style_text, std::string_view script_text);

}  // namespace clipwarden
