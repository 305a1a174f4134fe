// Bytes that are not UTF-8 (file names) and the lossless escaped form used
// for them in JSON. The well-formedness rules are RFC 3629 section 4's
// UTF8-octets grammar; the malformed examples are the classic ones from it
// (overlong '/', an encoded surrogate, a code point above U+10FFFF).
#include <gtest/gtest.h>

#include "analyzer/core/byte_text.h"

using namespace clipwarden;

TEST(ByteText, Rfc3629WellFormedAndMalformedSequences) {
  EXPECT_TRUE(is_valid_utf8(""));
  EXPECT_TRUE(is_valid_utf8("plain ascii"));
  EXPECT_TRUE(is_valid_utf8("caf\xc3\xa9 \xe8\xa1\x97 \xf0\x9f\x8e\xac"));  // é, 街, 🎬
  EXPECT_TRUE(is_valid_utf8("\xf4\x8f\xbf\xbf"));                           // U+10FFFF
  EXPECT_FALSE(is_valid_utf8("\xff"));
  EXPECT_FALSE(is_valid_utf8("caf\xe9"));                   // Latin-1 é
  EXPECT_FALSE(is_valid_utf8("\xc0\xaf"));                  // overlong '/'
  EXPECT_FALSE(is_valid_utf8("\xe0\x80\xaf"));              // overlong '/', three bytes
  EXPECT_FALSE(is_valid_utf8("\xed\xa0\x80"));              // U+D800, a surrogate
  EXPECT_FALSE(is_valid_utf8("\xf4\x90\x80\x80"));          // U+110000
  EXPECT_FALSE(is_valid_utf8("\xe8\xa1"));                  // cut in the middle
  EXPECT_FALSE(is_valid_utf8(std::string("a\x80") + "b"));  // lone continuation byte
}

TEST(ByteText, EscapedFormKeepsEveryByte) {
  EXPECT_EQ(escape_bytes("take\xff.mp4"), "take\\xff.mp4");
  EXPECT_EQ(escape_bytes("a\\b\xe9"), "a\\\\b\\xe9");     // '\' doubled, so the form is unambiguous
  EXPECT_EQ(escape_bytes("caf\xc3\xa9"), "caf\xc3\xa9");  // valid UTF-8 stays as it is
  // Every single byte and a few mixtures go there and back unchanged.
  for (int b = 0; b < 256; ++b) {
    const std::string bytes = std::string("x") + static_cast<char>(b) + "\\x41";
    const std::string escaped = escape_bytes(bytes);
    EXPECT_TRUE(is_valid_utf8(escaped)) << b;
    auto back = unescape_bytes(escaped);
    ASSERT_TRUE(back) << b;
    EXPECT_EQ(*back, bytes) << b;
  }
  EXPECT_FALSE(unescape_bytes("a\\q"));
  EXPECT_FALSE(unescape_bytes("a\\x4"));
  EXPECT_FALSE(unescape_bytes("a\\"));
}

TEST(ByteText, JsonFieldIsFlaggedOnlyWhenEscaped) {
  nlohmann::json j = nlohmann::json::object();
  put_bytes_field(j, "path", "ok/caf\xc3\xa9.mp4");
  EXPECT_FALSE(j.contains("path_escaped"));
  EXPECT_EQ(get_bytes_field(j, "path"), "ok/caf\xc3\xa9.mp4");
  // A name that merely looks escaped is not touched without the flag.
  put_bytes_field(j, "path", "odd\\xff.mp4");
  EXPECT_EQ(get_bytes_field(j, "path"), "odd\\xff.mp4");
  put_bytes_field(j, "path", "bad\xff.mp4");
  EXPECT_EQ(j["path_escaped"], true);
  EXPECT_NO_THROW((void)j.dump());
  EXPECT_EQ(get_bytes_field(nlohmann::json::parse(j.dump()), "path"), "bad\xff.mp4");
  EXPECT_EQ(printable("bad\xff.mp4"), "bad\\xff.mp4");
  EXPECT_EQ(printable("fine\\name"), "fine\\name");  // UTF-8 text is shown as it is
}

TEST(ByteText, DumpNeverThrowsOnBadUtf8) {
  const nlohmann::json j = {{"error", "clip\xff: cannot open"}};
  EXPECT_THROW((void)j.dump(), nlohmann::json::type_error);  // what ended a whole batch
  const std::string text = dump_json(j);
  EXPECT_TRUE(is_valid_utf8(text));
  EXPECT_NE(text.find("clip\xef\xbf\xbd: cannot open"), std::string::npos) << text;  // U+FFFD
}
