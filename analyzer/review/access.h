// Who may talk to the review server, decided from a request's headers alone
// (no network or file access), so every rule can be unit-tested:
//  - the Host header must name the address the server listens on (a page on
//    another site that rebinds its DNS name to 127.0.0.1 sends its own name);
//  - a request a browser marks as coming from another site (Origin not ours,
//    Sec-Fetch-Site cross-site or same-site) is refused whatever it carries;
//  - every request carries the access token, in the X-Clipwarden-Token header
//    or the `token` query parameter; a state change (POST) must carry it in
//    the header, which a form or link on another site cannot set;
//  - only POST changes state: a GET or HEAD on a state-changing path is
//    refused (405) before anything runs.
#pragma once

#include <optional>
#include <string>
#include <vector>

namespace clipwarden::review {

// 32 hex digits (128 bits) from the kernel's random source (getrandom).
std::string random_token();

// Equal strings, compared in time that does not depend on where they differ.
bool same_secret(const std::string& a, const std::string& b);

struct AccessRequest {
  std::string method;          // "GET", "POST", ...
  std::string path;            // without the query
  std::string host;            // the Host header
  std::string origin;          // the Origin header, "" when absent
  std::string sec_fetch_site;  // the Sec-Fetch-Site header, "" when absent
  std::string header_token;    // X-Clipwarden-Token, "" when absent
  std::string query_token;     // ?token=, "" when absent
};

struct AccessRules {
  std::string token;
  std::vector<std::string> hosts;  // accepted Host values, e.g. "127.0.0.1:8765"
};

// The Host values a server on host:port answers to: "host:port", and for a
// loopback address also "localhost:port" and "127.0.0.1:port".
std::vector<std::string> accepted_hosts(const std::string& host, int port);

// True for paths whose requests change state (decisions): only POST there.
bool changes_state(const std::string& path);

struct Refusal {
  int status = 403;    // 400, 401, 403 or 405
  std::string reason;  // one line, shown to the caller
};

// Nothing when the request may go on, else why not.
std::optional<Refusal> check_access(const AccessRequest& request, const AccessRules& rules);

}  // namespace clipwarden::review
