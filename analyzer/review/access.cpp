#include "analyzer/review/access.h"

#include <sys/random.h>

#include <algorithm>
#include <cerrno>
#include <cstdint>
#include <stdexcept>

#include "clipwarden/review.h"

namespace clipwarden {

bool is_loopback_host(const std::string& host) {
  return host == "localhost" || host == "::1" || host == "[::1]" || host.rfind("127.", 0) == 0;
}

namespace review {

std::string random_token() {
  unsigned char bytes[16];
  size_t got = 0;
  while (got < sizeof bytes) {
    const ssize_t n = getrandom(bytes + got, sizeof bytes - got, 0);
    if (n < 0 && errno == EINTR) continue;
    // getrandom only fails on kernels older than 3.17; a token that is not
    // random would be worse than not starting.
    if (n < 0) throw std::runtime_error("the kernel's random source is not available");
    got += static_cast<size_t>(n);
  }
  static const char* hex = "0123456789abcdef";
  std::string out;
  for (unsigned char b : bytes) {
    out.push_back(hex[b >> 4]);
    out.push_back(hex[b & 15]);
  }
  return out;
}

bool same_secret(const std::string& a, const std::string& b) {
  if (a.size() != b.size()) return false;
  unsigned char diff = 0;
  for (size_t i = 0; i < a.size(); ++i)
    diff |= static_cast<unsigned char>(a[i]) ^ static_cast<unsigned char>(b[i]);
  return diff == 0;
}

std::vector<std::string> accepted_hosts(const std::string& host, int port) {
  const std::string p = ":" + std::to_string(port);
  const bool v6 = host.find(':') != std::string::npos && host.front() != '[';
  std::vector<std::string> out = {(v6 ? "[" + host + "]" : host) + p};
  if (is_loopback_host(host))
    for (const char* name : {"localhost", "127.0.0.1"})
      if (std::find(out.begin(), out.end(), name + p) == out.end()) out.push_back(name + p);
  return out;
}

bool changes_state(const std::string& path) { return path.rfind("/api/decide", 0) == 0; }

std::optional<Refusal> check_access(const AccessRequest& r, const AccessRules& rules) {
  if (std::find(rules.hosts.begin(), rules.hosts.end(), r.host) == rules.hosts.end())
    return Refusal{400, "unexpected Host header '" + r.host + "'"};
  if (!r.origin.empty()) {
    bool ours = false;
    for (const auto& h : rules.hosts) ours = ours || r.origin == "http://" + h;
    if (!ours) return Refusal{403, "cross-origin request refused (Origin " + r.origin + ")"};
  }
  if (r.sec_fetch_site == "cross-site" || r.sec_fetch_site == "same-site")
    return Refusal{403, "cross-site request refused"};
  const bool state = changes_state(r.path);
  if (state && r.method != "POST") return Refusal{405, "state changes need POST"};
  // A state change must carry the token in its header: a form or a link on
  // another page can put it in the query but never in a header.
  const std::string& token = state ? r.header_token : (r.header_token.empty() ? r.query_token : r.header_token);
  if (token.empty()) return Refusal{401, "access token missing (open the address the server printed)"};
  if (!same_secret(token, rules.token)) return Refusal{403, "wrong access token"};
  return std::nullopt;
}

}  // namespace review
}  // namespace clipwarden
