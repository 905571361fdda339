#include "tcp_probe.h"

#include <fcntl.h>
#include <netdb.h>
#include <poll.h>
#include <sys/socket.h>
#include <unistd.h>

#include <cerrno>
#include <memory>

#include "dewmargin/broker_uri.h"

namespace dewmargin::detail {

std::optional<host_port> split_broker_uri(const std::string& uri) {
  const auto scheme_end = uri.find("://");
  if (scheme_end == std::string::npos) return std::nullopt;
  std::string rest = uri.substr(scheme_end + 3);
  rest = rest.substr(0, rest.find('/'));
  host_port hp;
  hp.port = broker_transport_of(uri) == broker_transport::tls ? "8883" : "1883";
  if (!rest.empty() && rest.front() == '[') {
    const auto close = rest.find(']');
    if (close == std::string::npos) return std::nullopt;
    hp.host = rest.substr(1, close - 1);
    if (close + 1 < rest.size() && rest[close + 1] == ':') hp.port = rest.substr(close + 2);
  } else {
    const auto colon = rest.rfind(':');
    hp.host = rest.substr(0, colon);
    if (colon != std::string::npos) hp.port = rest.substr(colon + 1);
  }
  if (hp.host.empty() || hp.port.empty()) return std::nullopt;
  return hp;
}

bool tcp_port_accepts(const host_port& where, std::chrono::milliseconds timeout) {
  addrinfo hints{};
  hints.ai_family = AF_UNSPEC;
  hints.ai_socktype = SOCK_STREAM;
  addrinfo* found = nullptr;
  if (getaddrinfo(where.host.c_str(), where.port.c_str(), &hints, &found) != 0) return false;
  const std::unique_ptr<addrinfo, void (*)(addrinfo*)> addresses(found, &freeaddrinfo);
  for (const addrinfo* a = addresses.get(); a != nullptr; a = a->ai_next) {
    const int fd = socket(a->ai_family, a->ai_socktype | SOCK_NONBLOCK | SOCK_CLOEXEC, a->ai_protocol);
    if (fd < 0) continue;
    bool ok = connect(fd, a->ai_addr, a->ai_addrlen) == 0;
    if (!ok && errno == EINPROGRESS) {
      pollfd p{fd, POLLOUT, 0};
      if (poll(&p, 1, static_cast<int>(timeout.count())) == 1) {
        int err = 0;
        socklen_t len = sizeof err;
        ok = getsockopt(fd, SOL_SOCKET, SO_ERROR, &err, &len) == 0 && err == 0;
      }
    }
    close(fd);
    if (ok) return true;
  }
  return false;
}

}  // namespace dewmargin::detail
