// Escaping text from inputs (file names, prompts, metadata) for HTML, so no
// input can add markup or script to a page.
#pragma once

#include <string>
#include <string_view>

namespace framelint {

// Text content and double- or single-quoted attribute values: & < > " '.
std::string html_escape(std::string_view text);

// A relative link to a file in the same folder: every byte outside the URL
// unreserved set (RFC 3986 section 2.3) percent-encoded, then HTML-escaped.
std::string url_escape_path(std::string_view path);

}  // namespace framelint
