// Escaping and encodings used by the HTML page. Sources: the HTML
// specification's character references for & < > " ' (escaping is our own
// rule: all five, everywhere); RFC 4648 section 10 test vectors for base64;
// FIPS 180-2 appendix B.1 ("abc") for SHA-256, as used by CSP hash sources.
#include <gtest/gtest.h>

#include "report/html/csp.h"
#include "report/html/html_escape.h"

using namespace clipwarden;

TEST(HtmlEscape, EscapesTheFiveSpecialCharacters) {
  EXPECT_EQ(html_escape("<img src=x onerror=alert(1)>.mp4"), "&lt;img src=x onerror=alert(1)&gt;.mp4");
  EXPECT_EQ(html_escape("a & \"b\" 'c'"), "a &amp; &quot;b&quot; &#39;c&#39;");
  EXPECT_EQ(html_escape("&amp;"), "&amp;amp;");  // escaping is not idempotent on purpose
  EXPECT_EQ(html_escape("plain \xc3\xa9t\xc3\xa9"), "plain \xc3\xa9t\xc3\xa9");  // UTF-8 untouched
  EXPECT_EQ(html_escape(""), "");
}

TEST(Base64, Rfc4648TestVectors) {
  EXPECT_EQ(base64_encode(""), "");
  EXPECT_EQ(base64_encode("f"), "Zg==");
  EXPECT_EQ(base64_encode("fo"), "Zm8=");
  EXPECT_EQ(base64_encode("foo"), "Zm9v");
  EXPECT_EQ(base64_encode("foob"), "Zm9vYg==");
  EXPECT_EQ(base64_encode("fooba"), "Zm9vYmE=");
  EXPECT_EQ(base64_encode("foobar"), "Zm9vYmFy");
  EXPECT_EQ(base64_encode(std::string("\xff\xfe\x00", 3)), "//4A");
  EXPECT_EQ(data_uri("image/png", "foo"), "data:image/png;base64,Zm9v");
}

TEST(Csp, HashSourceIsBase64OfSha256) {
  // SHA-256("abc") = ba7816bf 8f01cfea 414140de 5dae2223 b00361a3 96177a9c b410ff61 f20015ad.
  EXPECT_EQ(csp_hash_source("abc"), "'sha256-ungWv48Bz+pBQUDeXa4iI7ADYaOWF3qctBD/YfIAFa0='");
  const std::string policy = content_security_policy("s", "j");
  EXPECT_NE(policy.find("default-src 'none'"), std::string::npos);
  EXPECT_NE(policy.find("img-src data:"), std::string::npos);
  EXPECT_NE(policy.find("style-src " + csp_hash_source("s")), std::string::npos);
  EXPECT_NE(policy.find("script-src " + csp_hash_source("j")), std::string::npos);
  EXPECT_EQ(policy.find("unsafe"), std::string::npos);
}
