// File names on Linux are bytes, not text: a name may hold bytes that are
// not UTF-8 (0xFF, a Latin-1 "é", a UTF-8 character cut in half). JSON
// strings must be UTF-8, so such a name is written in an escaped form that
// keeps every byte: valid UTF-8 as it is, '\' doubled, and each byte of an
// invalid sequence as \xHH. A JSON field holding bytes is written as
// "key" (the text, escaped when needed) plus "key_escaped": true exactly when
// the escaped form was used, so readers can restore the bytes.
#pragma once

#include <optional>
#include <string>
#include <string_view>

#include <nlohmann/json.hpp>

namespace clipwarden {

// Length of the well-formed UTF-8 sequence starting at s[i] (RFC 3629: no
// overlong forms, no surrogates, nothing above U+10FFFF), or 0.
size_t utf8_sequence_length(std::string_view s, size_t i);
bool is_valid_utf8(std::string_view s);

// The lossless escaped form described above, and back (nothing when `text`
// is not a well-formed escaped form).
std::string escape_bytes(std::string_view bytes);
std::optional<std::string> unescape_bytes(std::string_view text);

// Bytes shown to a person (messages, pages): the text itself when it is
// UTF-8, else its escaped form.
std::string printable(std::string_view bytes);

// obj[key] = bytes, escaped with obj[key + "_escaped"] = true when needed.
void put_bytes_field(nlohmann::json& obj, const std::string& key, const std::string& bytes);
// The bytes of a field written by put_bytes_field; nothing when the field is
// absent, not a string, or flagged but not a well-formed escaped form.
std::optional<std::string> get_bytes_field(const nlohmann::json& obj, const std::string& key);

// JSON text that cannot throw on a string that is not UTF-8 (a stray byte
// becomes U+FFFD): a last line of defence for every file the tool writes,
// since one bad byte in a message must not end a batch. Fields that must
// keep their bytes use put_bytes_field.
std::string dump_json(const nlohmann::json& j, int indent = -1);

}  // namespace clipwarden
