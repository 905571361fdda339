// The web server in process (the end-to-end checks through the service are in
// tests/live/test_http_live.cpp): its accept loop outlives accept() errors that ended
// httplib's own loop for good, the server answers after running out of descriptors, and
// stop() ends it and frees the port, even right after start.
#include <arpa/inet.h>
#include <fcntl.h>
#include <gtest/gtest.h>
#include <netinet/in.h>
#include <poll.h>
#include <sys/resource.h>
#include <sys/socket.h>
#include <unistd.h>

#include <atomic>
#include <cerrno>
#include <chrono>
#include <mutex>
#include <string>
#include <thread>
#include <vector>

#include "accept_loop.h"
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

// Uses up the process's descriptors (under a lowered limit) until destroyed, whatever
// the test's outcome: the rest of the test binary gets them back.
class descriptors_used_up {
 public:
  descriptors_used_up() {
    if (::getrlimit(RLIMIT_NOFILE, &old_limit_) != 0) return;
    rlimit low = old_limit_;
    low.rlim_cur = std::min<rlim_t>(old_limit_.rlim_cur, 512);
    lowered_ = ::setrlimit(RLIMIT_NOFILE, &low) == 0;
    for (;;) {
      const int fd = ::open("/dev/null", O_RDONLY | O_CLOEXEC);
      if (fd < 0) break;
      fillers_.push_back(fd);
    }
    out_of_descriptors_ = errno == EMFILE;
  }
  ~descriptors_used_up() {
    for (int fd : fillers_) ::close(fd);
    if (lowered_) (void)::setrlimit(RLIMIT_NOFILE, &old_limit_);
  }
  descriptors_used_up(const descriptors_used_up&) = delete;
  descriptors_used_up& operator=(const descriptors_used_up&) = delete;
  [[nodiscard]] bool out_of_descriptors() const { return out_of_descriptors_; }

 private:
  rlimit old_limit_{};
  bool lowered_ = false;
  bool out_of_descriptors_ = false;
  std::vector<int> fillers_;
};

// httplib 0.11's loop ended on every accept() error but EMFILE, EINTR and EAGAIN. Ours goes on
// after each of the errors that can come and go (accept_one fails as told, then accepts).
TEST(HttpAcceptLoop, GoesOnAfterEachAcceptErrorAndEndsWhenWoken) {
  const int listener = ::socket(AF_INET, SOCK_STREAM | SOCK_CLOEXEC, 0);
  ASSERT_GE(listener, 0);
  sockaddr_in addr{};
  addr.sin_family = AF_INET;
  addr.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
  ASSERT_EQ(::bind(listener, reinterpret_cast<const sockaddr*>(&addr), sizeof addr), 0);
  ASSERT_EQ(::listen(listener, 16), 0);
  socklen_t len = sizeof addr;
  ASSERT_EQ(::getsockname(listener, reinterpret_cast<sockaddr*>(&addr), &len), 0);
  const int port = ntohs(addr.sin_port);
  int wake[2];
  ASSERT_EQ(::pipe2(wake, O_CLOEXEC), 0);

  const std::vector<int> errors = {ENOBUFS, ENOMEM, ENFILE, EMFILE, EPROTO, EPERM, ECONNABORTED, EINTR};
  std::atomic<std::size_t> failed{0};
  std::mutex mutex;
  std::vector<int> admitted;
  std::thread loop([&] {
    http_detail::run_accept_loop(
        listener, wake[0],
        [&](int fd) {
          const std::size_t i = failed.load();
          if (i < errors.size()) {
            failed = i + 1;
            errno = errors[i];
            return -1;
          }
          return http_detail::accept_connection(fd);
        },
        [&](int fd) {
          const std::lock_guard<std::mutex> lock(mutex);
          admitted.push_back(fd);
        });
  });
  const int client = ::socket(AF_INET, SOCK_STREAM | SOCK_CLOEXEC, 0);
  ASSERT_GE(client, 0);
  ASSERT_EQ(connect_to(port, client), 0);
  const auto until = std::chrono::steady_clock::now() + 10s;
  for (;;) {
    {
      const std::lock_guard<std::mutex> lock(mutex);
      if (!admitted.empty() || std::chrono::steady_clock::now() > until) break;
    }
    std::this_thread::sleep_for(10ms);
  }
  const char c = 1;
  ASSERT_EQ(::write(wake[1], &c, 1), 1);
  loop.join();  // a loop that did not end would hang here: ctest's timeout ends the test
  EXPECT_EQ(failed.load(), errors.size()) << "every error was met";
  ASSERT_EQ(admitted.size(), 1u) << "the connection was accepted after the errors";
  for (int fd : admitted) ::close(fd);
  for (int fd : {client, listener, wake[0], wake[1]}) ::close(fd);
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
  {
    const descriptors_used_up used_up;
    ASSERT_TRUE(used_up.out_of_descriptors());
    ASSERT_EQ(connect_to(server->port(), client), 0);  // the kernel completes it; accept() cannot
    std::this_thread::sleep_for(300ms);                // several failed accepts
  }

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
