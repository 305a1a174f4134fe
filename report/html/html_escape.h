// Text that goes into an HTML page: escaping for element text and attribute
// values, links, and base64 for data: URIs. Every string that comes from an
// input (file names, prompts, reasons) passes through html_escape before it
// is written into a page, so it always reads as text and never as markup.
#pragma once

#include <string>
#include <string_view>

namespace clipwarden {

// Replaces & < > " ' with character references. Safe for element text and
// for attribute values in double or single quotes.
std::string html_escape(std::string_view text);

// A relative link to a file in the same folder: every byte outside the URL
// unreserved set (RFC 3986 section 2.3) percent-encoded, then HTML-escaped.
std::string url_escape_path(std::string_view path);

// Standard base64 (RFC 4648, section 4) with '=' padding, no line breaks.
std::string base64_encode(std::string_view bytes);

// "data:<mime>;base64,<payload>" for embedding an image in a page.
std::string data_uri(std::string_view mime, std::string_view bytes);

}  // namespace clipwarden
