// The `http:` section: where the service's web server listens and the token it asks for.
// Loopback by default; any other address needs a token, or the config is refused.
#include <algorithm>
#include <cctype>

#include "config_reading.h"

namespace dewmargin::config_detail {
namespace {

bool all_digits(const std::string& s) {
  return !s.empty() &&
         std::all_of(s.begin(), s.end(), [](char c) { return std::isdigit(static_cast<unsigned char>(c)); });
}

// Dotted IPv4 with four parts of 0-255.
bool is_ipv4(const std::string& host) {
  int parts = 0;
  std::size_t start = 0;
  while (start <= host.size()) {
    const std::size_t dot = std::min(host.find('.', start), host.size());
    const std::string part = host.substr(start, dot - start);
    if (!all_digits(part) || part.size() > 3 || std::stoi(part) > 255) return false;
    ++parts;
    start = dot + 1;
    if (dot == host.size()) break;
  }
  return parts == 4;
}

bool is_loopback(const std::string& host) {
  return host == "localhost" || host == "::1" || (is_ipv4(host) && host.rfind("127.", 0) == 0);
}

}  // namespace

void read_http(const yaml_node& node, reading& r) {
  const map_reader m(node, "http", {"listen", "token_file"}, r.diag);
  http_config h;
  bool ok = true;
  if (auto listen = m.text("listen")) {
    const std::string& v = listen->value;
    const std::size_t colon = v.rfind(':');
    std::string host = colon == std::string::npos ? std::string() : v.substr(0, colon);
    const std::string port = colon == std::string::npos ? std::string() : v.substr(colon + 1);
    if (host.size() >= 2 && host.front() == '[' && host.back() == ']') host = host.substr(1, host.size() - 2);
    const bool host_ok = is_ipv4(host) || host == "localhost" ||
                         (host.find(':') != std::string::npos &&
                          host.find_first_not_of("0123456789abcdefABCDEF:.") == std::string::npos);
    if (!host_ok || !all_digits(port) || port.size() > 5 || std::stoi(port) < 1 || std::stoi(port) > 65535) {
      r.diag.error(listen->at, "http listen '" + v +
                                   "' must be HOST:PORT with an IP address (or localhost) and a port 1-65535, as in "
                                   "127.0.0.1:8088 or [::1]:8088");
      ok = false;
    } else {
      h.host = host == "localhost" ? "127.0.0.1" : host;
      h.port = std::stoi(port);
    }
  }
  if (auto token = m.text("token_file")) {
    if (token->value.empty()) {
      r.diag.error(token->at, "'token_file' must not be empty");
      ok = false;
    }
    h.token_file = token->value;
  }
  if (ok && !is_loopback(h.host) && h.token_file.empty()) {
    r.diag.error(m.has("listen") ? m.value_mark("listen") : mark_of(node),
                 "http listen '" + h.host + ":" + std::to_string(h.port) +
                     "' is reachable from other machines: set 'token_file' (a bearer token), or listen on "
                     "127.0.0.1 and reach it through an SSH tunnel");
    ok = false;
  }
  if (ok) r.config.http = h;
}

}  // namespace dewmargin::config_detail
