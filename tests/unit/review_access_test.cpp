// The review server's access rules (analyzer/review/access.h), request by
// request: the cases a browser on another site or a stray client produces.
#include <gtest/gtest.h>

#include <set>

#include "analyzer/review/access.h"
#include "clipwarden/review.h"

using namespace clipwarden::review;

namespace {

AccessRules rules() { return {"0123456789abcdef0123456789abcdef", accepted_hosts("127.0.0.1", 8765)}; }

AccessRequest request(const std::string& method, const std::string& path) {
  AccessRequest r;
  r.method = method;
  r.path = path;
  r.host = "127.0.0.1:8765";
  r.query_token = rules().token;
  return r;
}

}  // namespace

TEST(ReviewAccess, TokensAreFreshHexOfSixteenBytes) {
  std::set<std::string> seen;
  for (int i = 0; i < 50; ++i) {
    const std::string t = random_token();
    EXPECT_EQ(t.size(), 32u);
    EXPECT_EQ(t.find_first_not_of("0123456789abcdef"), std::string::npos) << t;
    seen.insert(t);
  }
  EXPECT_EQ(seen.size(), 50u);
}

TEST(ReviewAccess, AcceptsTheTokenInTheQueryOrTheHeader) {
  EXPECT_FALSE(check_access(request("GET", "/"), rules()));
  AccessRequest header = request("GET", "/clip/3");
  header.query_token.clear();
  header.header_token = rules().token;
  EXPECT_FALSE(check_access(header, rules()));
  AccessRequest localhost = request("GET", "/");
  localhost.host = "localhost:8765";
  localhost.origin = "http://localhost:8765";
  EXPECT_FALSE(check_access(localhost, rules()));
}

TEST(ReviewAccess, RefusesMissingOrWrongTokens) {
  AccessRequest none = request("GET", "/");
  none.query_token.clear();
  EXPECT_EQ(check_access(none, rules())->status, 401);
  AccessRequest wrong = request("GET", "/");
  wrong.query_token[5] = 'x';
  EXPECT_EQ(check_access(wrong, rules())->status, 403);
  AccessRequest shorter = request("GET", "/");
  shorter.query_token.pop_back();
  EXPECT_EQ(check_access(shorter, rules())->status, 403);
}

TEST(ReviewAccess, RefusesOtherSitesAndOtherHostNames) {
  AccessRequest origin = request("GET", "/");
  origin.origin = "http://127.0.0.1:9999";  // another port is another origin
  EXPECT_EQ(check_access(origin, rules())->status, 403);
  AccessRequest fetch_site = request("GET", "/");
  fetch_site.sec_fetch_site = "cross-site";
  EXPECT_EQ(check_access(fetch_site, rules())->status, 403);
  AccessRequest rebound = request("GET", "/");
  rebound.host = "attacker.example:8765";
  EXPECT_EQ(check_access(rebound, rules())->status, 400);
}

TEST(ReviewAccess, StateChangesNeedPostWithTheTokenInTheHeader) {
  EXPECT_EQ(check_access(request("GET", "/api/decide"), rules())->status, 405);
  EXPECT_EQ(check_access(request("HEAD", "/api/decide"), rules())->status, 405);
  AccessRequest query_only = request("POST", "/api/decide");
  EXPECT_EQ(check_access(query_only, rules())->status, 401);
  AccessRequest header = request("POST", "/api/decide");
  header.header_token = rules().token;
  header.origin = "http://127.0.0.1:8765";
  EXPECT_FALSE(check_access(header, rules()));
}

TEST(ReviewAccess, LoopbackAddresses) {
  EXPECT_TRUE(clipwarden::is_loopback_host("127.0.0.1"));
  EXPECT_TRUE(clipwarden::is_loopback_host("::1"));
  EXPECT_TRUE(clipwarden::is_loopback_host("localhost"));
  EXPECT_FALSE(clipwarden::is_loopback_host("0.0.0.0"));
  EXPECT_FALSE(clipwarden::is_loopback_host("192.168.1.4"));
  EXPECT_EQ(accepted_hosts("0.0.0.0", 80), std::vector<std::string>{"0.0.0.0:80"});
}
