#include "analyzer/core/byte_text.h"

namespace clipwarden {

size_t utf8_sequence_length(std::string_view s, size_t i) {
  const auto byte = [&](size_t k) { return static_cast<unsigned char>(s[k]); };
  const unsigned char c = byte(i);
  if (c < 0x80) return 1;
  size_t n;
  unsigned char lo = 0x80, hi = 0xBF;  // allowed range of the second byte (RFC 3629 table)
  if (c >= 0xC2 && c <= 0xDF) {
    n = 2;
  } else if (c >= 0xE0 && c <= 0xEF) {
    n = 3;
    if (c == 0xE0) lo = 0xA0;  // overlong
    if (c == 0xED) hi = 0x9F;  // UTF-16 surrogates
  } else if (c >= 0xF0 && c <= 0xF4) {
    n = 4;
    if (c == 0xF0) lo = 0x90;  // overlong
    if (c == 0xF4) hi = 0x8F;  // above U+10FFFF
  } else {
    return 0;
  }
  if (i + n > s.size()) return 0;
  if (byte(i + 1) < lo || byte(i + 1) > hi) return 0;
  for (size_t k = 2; k < n; ++k)
    if (byte(i + k) < 0x80 || byte(i + k) > 0xBF) return 0;
  return n;
}

bool is_valid_utf8(std::string_view s) {
  for (size_t i = 0; i < s.size();) {
    const size_t n = utf8_sequence_length(s, i);
    if (n == 0) return false;
    i += n;
  }
  return true;
}

std::string escape_bytes(std::string_view bytes) {
  static const char* hex = "0123456789abcdef";
  std::string out;
  out.reserve(bytes.size() + 8);
  for (size_t i = 0; i < bytes.size();) {
    const size_t n = utf8_sequence_length(bytes, i);
    if (n == 0) {
      const auto c = static_cast<unsigned char>(bytes[i++]);
      out += "\\x";
      out.push_back(hex[c >> 4]);
      out.push_back(hex[c & 15]);
    } else if (bytes[i] == '\\') {
      out += "\\\\";
      ++i;
    } else {
      out.append(bytes.substr(i, n));
      i += n;
    }
  }
  return out;
}

std::optional<std::string> unescape_bytes(std::string_view text) {
  const auto digit = [](char c) -> int {
    if (c >= '0' && c <= '9') return c - '0';
    if (c >= 'a' && c <= 'f') return c - 'a' + 10;
    if (c >= 'A' && c <= 'F') return c - 'A' + 10;
    return -1;
  };
  std::string out;
  out.reserve(text.size());
  for (size_t i = 0; i < text.size(); ++i) {
    if (text[i] != '\\') {
      out.push_back(text[i]);
      continue;
    }
    if (i + 1 < text.size() && text[i + 1] == '\\') {
      out.push_back('\\');
      ++i;
      continue;
    }
    if (i + 3 >= text.size() || text[i + 1] != 'x') return std::nullopt;
    const int a = digit(text[i + 2]), b = digit(text[i + 3]);
    if (a < 0 || b < 0) return std::nullopt;
    out.push_back(static_cast<char>(a * 16 + b));
    i += 3;
  }
  return out;
}

std::string printable(std::string_view bytes) {
  return is_valid_utf8(bytes) ? std::string(bytes) : escape_bytes(bytes);
}

void put_bytes_field(nlohmann::json& obj, const std::string& key, const std::string& bytes) {
  if (is_valid_utf8(bytes)) {
    obj[key] = bytes;
    return;
  }
  obj[key] = escape_bytes(bytes);
  obj[key + "_escaped"] = true;
}

std::optional<std::string> get_bytes_field(const nlohmann::json& obj, const std::string& key) {
  if (!obj.is_object() || !obj.contains(key) || !obj[key].is_string()) return std::nullopt;
  const std::string& text = obj[key].get_ref<const std::string&>();
  const auto flag = obj.find(key + "_escaped");
  if (flag == obj.end() || !flag->is_boolean() || !flag->get<bool>()) return text;
  return unescape_bytes(text);
}

std::string dump_json(const nlohmann::json& j, int indent) {
  return j.dump(indent, ' ', false, nlohmann::json::error_handler_t::replace);
}

}  // namespace clipwarden
