#include "dewmargin/tcp_nodelay.h"

#include <arpa/inet.h>
#include <dirent.h>
#include <netinet/in.h>
#include <netinet/tcp.h>
#include <sys/socket.h>
#include <sys/stat.h>

#include <cstdlib>
#include <string>

#include "tcp_probe.h"

namespace dewmargin {
namespace {

int peer_port_of(int fd) {
  sockaddr_storage peer{};
  socklen_t len = sizeof peer;
  if (getpeername(fd, reinterpret_cast<sockaddr*>(&peer), &len) != 0) return -1;
  if (peer.ss_family == AF_INET) return ntohs(reinterpret_cast<const sockaddr_in*>(&peer)->sin_port);
  if (peer.ss_family == AF_INET6) return ntohs(reinterpret_cast<const sockaddr_in6*>(&peer)->sin6_port);
  return -1;
}

bool is_tcp_stream(int fd) {
  int type = 0;
  socklen_t len = sizeof type;
  return getsockopt(fd, SOL_SOCKET, SO_TYPE, &type, &len) == 0 && type == SOCK_STREAM;
}

}  // namespace

int set_tcp_nodelay_to_peer(int peer_port) {
  DIR* dir = opendir("/proc/self/fd");
  if (dir == nullptr) return 0;
  int set = 0;
  while (const dirent* entry = readdir(dir)) {
    char* end = nullptr;
    const long fd_long = std::strtol(entry->d_name, &end, 10);
    if (end == entry->d_name || *end != '\0') continue;
    const int fd = static_cast<int>(fd_long);
    if (fd == dirfd(dir)) continue;
    struct stat st {};
    if (fstat(fd, &st) != 0 || !S_ISSOCK(st.st_mode)) continue;
    if (!is_tcp_stream(fd) || peer_port_of(fd) != peer_port) continue;
    const int one = 1;
    if (setsockopt(fd, IPPROTO_TCP, TCP_NODELAY, &one, sizeof one) == 0) ++set;
  }
  closedir(dir);
  return set;
}

int broker_uri_port(const std::string& uri) {
  const auto where = detail::split_broker_uri(uri);  // the one reading of a broker URI
  if (!where) return 0;
  char* end = nullptr;
  const long port = std::strtol(where->port.c_str(), &end, 10);
  if (end == where->port.c_str() || *end != '\0' || port < 1 || port > 65535) return 0;
  return static_cast<int>(port);
}

}  // namespace dewmargin
