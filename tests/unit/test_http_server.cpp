// The web server in process (the end-to-end checks through the service are in
// tests/live/test_http_live.cpp): its accept loop outlives a failing accept(), and stop()
// ends it at once, even right after start.
#include <arpa/inet.h>
#include <fcntl.h>
#include <gtest/gtest.h>
#include <netinet/in.h>
#include <poll.h>
#include <sys/resource.h>
#include <sys/socket.h>
#include <unistd.h>

#include <chrono>
#include <string>
#include <thread>
#include <vector>

#include "dewmargin/http_server.h"
#include "dewmargin/live_snapshot.h"

namespace dewmargin {
namespace {

using namespace std::chrono_literals;

int connect_to(int port, int fd) {
  sockaddr_in addr{};
  addr.sin_family = AF_INET;
  addr.sin_port = htons(static_cast<std::uint16_t>(port));
  addr.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
  return ::connect(fd, reinterpret_cast<const sockaddr*>(&addr), sizeof addr);
}

// Sends a GET on a connected socket and returns everything the server sent until it
// closed (it serves one request per connection), or what came within the time given.
std::string get_on(int fd, const std::string& path, std::chrono::milliseconds within) {
  const std::string request = "GET " + path + " HTTP/1.1\r\nHost: 127.0.0.1\r\nConnection: close\r\n\r\n";
  if (::send(fd, request.data(), request.size(), MSG_NOSIGNAL) != static_cast<ssize_t>(request.size())) return {};
  std::string answer;
  const auto until = std::chrono::steady_clock::now() + within;
  for (;;) {
    const auto left = std::chrono::duration_cast<std::chrono::milliseconds>(until - std::chrono::steady_clock::now());
    if (left.count() <= 0) return answer;
    pollfd p{fd, POLLIN, 0};
    if (::poll(&p, 1, static_cast<int>(left.count())) <= 0) return answer;
    char buf[4096];
    const ssize_t n = ::recv(fd, buf, sizeof buf, 0);
    if (n <= 0) return answer;
    answer.append(buf, static_cast<std::size_t>(n));
  }
}

std::string get(int port, const std::string& path) {
  const int fd = ::socket(AF_INET, SOCK_STREAM | SOCK_CLOEXEC, 0);
  if (fd < 0 || connect_to(port, fd) != 0) {
    if (fd >= 0) ::close(fd);
    return {};
  }
  std::string answer = get_on(fd, path, 10s);
  ::close(fd);
  return answer;
}

bool starts_with(const std::string& text, const std::string& head) { return text.rfind(head, 0) == 0; }

http_server_options any_port() {
  http_server_options o;
  o.port = 0;
  return o;
}

TEST(HttpServer, AnswersAfterAcceptFailedForWantOfDescriptors) {
  live_snapshot snapshot("dm", "unit-site", "test");
  auto started = http_server::start(any_port(), snapshot);
  ASSERT_TRUE(started) << started.err().message;
  const auto server = std::move(started).value();
  ASSERT_TRUE(starts_with(get(server->port(), "/metrics"), "HTTP/1.1 200"));

  // The client's socket first; then the process runs out of descriptors, so the server's
  // accept() fails (EMFILE) while this connection waits in the backlog.
  const int client = ::socket(AF_INET, SOCK_STREAM | SOCK_CLOEXEC, 0);
  ASSERT_GE(client, 0);
  rlimit old_limit{};
  ASSERT_EQ(::getrlimit(RLIMIT_NOFILE, &old_limit), 0);
  rlimit low = old_limit;
  low.rlim_cur = std::min<rlim_t>(old_limit.rlim_cur, 512);
  ASSERT_EQ(::setrlimit(RLIMIT_NOFILE, &low), 0);
  std::vector<int> fillers;
  for (;;) {
    const int fd = ::open("/dev/null", O_RDONLY | O_CLOEXEC);
    if (fd < 0) break;
    fillers.push_back(fd);
  }
  ASSERT_EQ(errno, EMFILE);
  ASSERT_EQ(connect_to(server->port(), client), 0);  // the kernel completes it; accept() cannot
  std::this_thread::sleep_for(300ms);                // several failed accepts
  for (int fd : fillers) ::close(fd);
  ASSERT_EQ(::setrlimit(RLIMIT_NOFILE, &old_limit), 0);

  // The waiting connection is served, and so is a new one.
  EXPECT_TRUE(starts_with(get_on(client, "/metrics", 10s), "HTTP/1.1 200"));
  ::close(client);
  EXPECT_TRUE(starts_with(get(server->port(), "/api/zones"), "HTTP/1.1 200"));
  server->stop();
}

TEST(HttpServer, StopRightAfterStartEndsAtOnceAndFreesThePort) {
  live_snapshot snapshot("dm", "unit-site", "test");
  for (int i = 0; i < 20; ++i) {
    auto started = http_server::start(any_port(), snapshot);
    ASSERT_TRUE(started) << started.err().message;
    const auto server = std::move(started).value();
    const int port = server->port();
    const auto before = std::chrono::steady_clock::now();
    server->stop();
    EXPECT_LT(std::chrono::steady_clock::now() - before, 5s);
    // Nothing listens any more.
    const int fd = ::socket(AF_INET, SOCK_STREAM | SOCK_CLOEXEC, 0);
    ASSERT_GE(fd, 0);
    EXPECT_NE(connect_to(port, fd), 0) << "port " << port << " still accepts after stop()";
    ::close(fd);
  }
}

}  // namespace
}  // namespace dewmargin
