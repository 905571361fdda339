// The web server: cpp-httplib parses requests and writes responses; the connection gate
// (connection_gate.h) decides when a connection gets a thread.
#include "dewmargin/http_server.h"

#include <arpa/inet.h>
#include <fcntl.h>
#include <httplib.h>
#include <netinet/in.h>
#include <poll.h>
#include <sys/socket.h>
#include <unistd.h>

#include <atomic>
#include <cerrno>
#include <cstring>
#include <nlohmann/json.hpp>
#include <thread>

#include "accept_loop.h"
#include "connection_gate.h"
#include "dewmargin/live_book.h"
#include "dewmargin/metrics_text.h"
#include "live_page.h"

namespace dewmargin {
namespace {

using steady = std::chrono::steady_clock;
constexpr int k_listen_backlog = 256;

// One request's socket for httplib, with a deadline for the whole request (a client that
// sends one byte every few seconds is still cut off) and a cap on what it may send.
class bounded_socket_stream final : public httplib::Stream {
 public:
  bounded_socket_stream(int fd, steady::time_point deadline, std::size_t max_read_bytes)
      : fd_(fd), deadline_(deadline), left_to_read_(max_read_bytes) {}

  bool is_readable() const override { return buffered_ < filled_ || wait(POLLIN); }
  bool is_writable() const override { return wait(POLLOUT); }

  ssize_t read(char* ptr, size_t size) override {
    if (buffered_ == filled_) {
      if (left_to_read_ == 0 || !wait(POLLIN)) return -1;
      const ssize_t n = ::recv(fd_, buffer_, std::min(sizeof buffer_, left_to_read_), 0);
      if (n <= 0) return n;
      left_to_read_ -= static_cast<std::size_t>(n);
      buffered_ = 0;
      filled_ = static_cast<std::size_t>(n);
    }
    const std::size_t n = std::min(size, filled_ - buffered_);
    std::memcpy(ptr, buffer_ + buffered_, n);
    buffered_ += n;
    return static_cast<ssize_t>(n);
  }

  ssize_t write(const char* ptr, size_t size) override {
    if (!wait(POLLOUT)) return -1;
    return ::send(fd_, ptr, size, MSG_NOSIGNAL);
  }

  void get_remote_ip_and_port(std::string& ip, int& port) const override { address(::getpeername, ip, port); }
  void get_local_ip_and_port(std::string& ip, int& port) const override { address(::getsockname, ip, port); }
  socket_t socket() const override { return fd_; }

 private:
  bool wait(short events) const {
    const auto left = std::chrono::duration_cast<std::chrono::milliseconds>(deadline_ - steady::now()).count();
    if (left <= 0) return false;
    pollfd p{fd_, events, 0};
    for (;;) {
      const int n = ::poll(&p, 1, static_cast<int>(left));
      if (n < 0 && errno == EINTR) continue;
      return n > 0 && (p.revents & events) != 0;
    }
  }

  template <typename Fn>
  void address(Fn fn, std::string& ip, int& port) const {
    sockaddr_storage addr{};
    socklen_t len = sizeof addr;
    ip.clear();
    port = 0;
    if (fn(fd_, reinterpret_cast<sockaddr*>(&addr), &len) != 0) return;
    char text[INET6_ADDRSTRLEN] = {};
    if (addr.ss_family == AF_INET) {
      const auto* a = reinterpret_cast<const sockaddr_in*>(&addr);
      ::inet_ntop(AF_INET, &a->sin_addr, text, sizeof text);
      port = ntohs(a->sin_port);
    } else if (addr.ss_family == AF_INET6) {
      const auto* a = reinterpret_cast<const sockaddr_in6*>(&addr);
      ::inet_ntop(AF_INET6, &a->sin6_addr, text, sizeof text);
      port = ntohs(a->sin6_port);
    }
    ip = text;
  }

  int fd_;
  steady::time_point deadline_;
  std::size_t left_to_read_;
  char buffer_[4096] = {};
  std::size_t buffered_ = 0;
  std::size_t filled_ = 0;
};

class gated_server final : public httplib::Server {
 public:
  gated_server() = default;
  ~gated_server() override { close_listener(); }
  gated_server(const gated_server&) = delete;
  gated_server& operator=(const gated_server&) = delete;

  // httplib listens with a backlog of 5 (a compile-time constant of the library): a burst of
  // connections then loses SYNs and each lost one costs its client a second. Listening again
  // on the bound socket raises the backlog (Linux takes a second listen() as an update).
  bool widen_backlog(int backlog) { return ::listen(svr_sock_, backlog) == 0; }

  // Accepts until wake_fd is readable (accept_loop.h: why not httplib's own loop).
  void accept_until_woken(http_detail::connection_gate& gate, int wake_fd, std::chrono::milliseconds io_timeout) {
    // A second bound beside the request deadline: a send into a client that reads nothing
    // cannot block a worker past it.
    const timeval tv{static_cast<time_t>(io_timeout.count() / 1000),
                     static_cast<suseconds_t>((io_timeout.count() % 1000) * 1000)};
    http_detail::run_accept_loop(svr_sock_, wake_fd, http_detail::accept_connection, [&gate, tv](int fd) {
      (void)::setsockopt(fd, SOL_SOCKET, SO_RCVTIMEO, &tv, sizeof tv);
      (void)::setsockopt(fd, SOL_SOCKET, SO_SNDTIMEO, &tv, sizeof tv);
      gate.admit(fd);
    });
  }

  void close_listener() {
    const int fd = svr_sock_.exchange(INVALID_SOCKET);
    if (fd != INVALID_SOCKET) ::close(fd);
  }

  // Serves one request on fd (a worker of the gate) and closes it.
  void serve(int fd, steady::time_point deadline, std::size_t max_bytes) noexcept {
    try {
      bounded_socket_stream stream(fd, deadline, max_bytes);
      bool closed = false;
      process_request(stream, /*close_connection=*/true, closed, [&](httplib::Request& req) {
        stream.get_remote_ip_and_port(req.remote_addr, req.remote_port);
        stream.get_local_ip_and_port(req.local_addr, req.local_port);
      });
    } catch (...) {
      // httplib answers a throwing handler with 500 itself; anything else ends this
      // connection only, never the service.
    }
    ::shutdown(fd, SHUT_RDWR);
    ::close(fd);
  }
};

// Compares without an early exit, so the time taken does not tell how much was right.
bool same_secret(const std::string& given, const std::string& expected) {
  unsigned char diff = given.size() == expected.size() ? 0 : 1;
  for (std::size_t i = 0; i < given.size(); ++i) {
    diff |= static_cast<unsigned char>(given[i] ^ expected[i % std::max<std::size_t>(1, expected.size())]);
  }
  return diff == 0;
}

// The host of a Host header ("127.0.0.1:8088", "[::1]:8088", "localhost") is a loopback name.
bool loopback_host(const std::string& host_header) {
  std::string host = host_header;
  if (!host.empty() && host.front() == '[') {
    host = host.substr(1, host.find(']') == std::string::npos ? std::string::npos : host.find(']') - 1);
  } else if (const auto colon = host.find(':'); colon != std::string::npos) {
    host = host.substr(0, colon);
  }
  return host == "localhost" || host == "::1" || host.rfind("127.", 0) == 0;
}

std::string json_array_of(const std::vector<const std::string*>& payloads) {
  std::string out = "[";
  for (std::size_t i = 0; i < payloads.size(); ++i) {
    if (i > 0) out += ",\n";
    out += *payloads[i];
  }
  return out + "]\n";
}

}  // namespace

struct http_server::impl {
  http_server_options options;
  const live_snapshot& snapshot;
  gated_server server;
  std::unique_ptr<http_detail::connection_gate> gate;
  std::thread listener;
  int wake_pipe[2] = {-1, -1};  // a byte here ends the accept loop
  int port = 0;
  std::atomic<bool> stopped{false};

  impl(http_server_options o, const live_snapshot& s) : options(std::move(o)), snapshot(s) {}
  ~impl() {
    stop();
    for (int fd : wake_pipe) {
      if (fd >= 0) ::close(fd);
    }
  }
  impl(const impl&) = delete;
  impl& operator=(const impl&) = delete;

  // Without a token the server listens on loopback only, and answers only requests made to
  // a loopback name: a web page elsewhere that points its own host name at 127.0.0.1 (DNS
  // rebinding) gets nothing. With a token the token decides.
  bool addressed_here(const httplib::Request& req, httplib::Response& res) const {
    if (!options.token.empty() || loopback_host(req.get_header_value("Host"))) return true;
    res.status = 403;
    res.set_content("this server answers requests to 127.0.0.1, [::1] or localhost only\n",
                    "text/plain; charset=utf-8");
    return false;
  }

  bool authorized(const httplib::Request& req, httplib::Response& res) const {
    if (!addressed_here(req, res)) return false;
    if (options.token.empty()) return true;
    const std::string header = req.get_header_value("Authorization");
    const std::string scheme = "Bearer ";
    if (header.compare(0, scheme.size(), scheme) == 0 && same_secret(header.substr(scheme.size()), options.token)) {
      return true;
    }
    res.status = 401;
    res.set_header("WWW-Authenticate", "Bearer realm=\"dewmargin\"");
    res.set_content("a bearer token is required (Authorization: Bearer TOKEN)\n", "text/plain; charset=utf-8");
    return false;
  }

  static void common_headers(httplib::Response& res) {
    res.set_header("Cache-Control", "no-store");
    res.set_header("X-Content-Type-Options", "nosniff");
  }

  void routes() {
    server.Get("/", [this](const httplib::Request& req, httplib::Response& res) {
      common_headers(res);
      if (!addressed_here(req, res)) return;
      // Everything the page needs is in it: no outside script, style, font or image.
      res.set_header("Content-Security-Policy",
                     "default-src 'none'; script-src 'unsafe-inline'; style-src 'unsafe-inline'; "
                     "connect-src 'self'; img-src data:; base-uri 'none'; frame-ancestors 'none'");
      res.set_content(http_detail::live_page_html(), "text/html; charset=utf-8");
    });
    server.Get("/metrics", [this](const httplib::Request& req, httplib::Response& res) {
      common_headers(res);
      if (!authorized(req, res)) return;
      res.set_content(format_metrics(snapshot.take(false)), "text/plain; version=0.0.4; charset=utf-8");
    });
    server.Get("/api/zones", [this](const httplib::Request& req, httplib::Response& res) {
      common_headers(res);
      if (!authorized(req, res)) return;
      const auto copy = snapshot.take(false);
      live::live_book book({copy.prefix});
      for (const auto& [topic, payload] : copy.states) (void)book.ingest(topic, payload);
      std::vector<const std::string*> payloads;
      for (const auto* z : book.zones_worst_first()) payloads.push_back(&z->payload);
      res.set_content(json_array_of(payloads), "application/json");
    });
    const auto by_kind = [this](const char* middle) {
      return [this, middle](const httplib::Request& req, httplib::Response& res) {
        common_headers(res);
        if (!authorized(req, res)) return;
        const auto copy = snapshot.take(false);
        const std::string head = copy.prefix + "/" + middle + "/";
        std::vector<const std::string*> payloads;
        for (const auto& [topic, payload] : copy.states) {
          if (topic.compare(0, head.size(), head) == 0) payloads.push_back(&payload);
        }
        res.set_content(json_array_of(payloads), "application/json");
      };
    };
    server.Get("/api/loops", by_kind("loop"));
    server.Get("/api/dehumidifiers", by_kind("dehumidifier"));
    server.Get("/api/margin-history", [this](const httplib::Request& req, httplib::Response& res) {
      common_headers(res);
      if (!authorized(req, res)) return;
      const auto copy = snapshot.take(true);
      nlohmann::json zones = nlohmann::json::object();
      for (const auto& [zone, series] : copy.margins) {
        nlohmann::json points = nlohmann::json::array();
        for (const auto& p : series) {
          points.push_back({to_unix_ms(p.ts), p.margin_k ? nlohmann::json(*p.margin_k) : nlohmann::json(nullptr)});
        }
        zones[zone] = std::move(points);
      }
      nlohmann::json doc = {{"window_s", 3600}, {"bucket_s", 30}, {"zones", std::move(zones)}};
      res.set_content(doc.dump() + "\n", "application/json");
    });
  }

  void stop() {
    if (stopped.exchange(true)) return;
    if (listener.joinable()) {
      const char c = 1;
      (void)!::write(wake_pipe[1], &c, 1);
      listener.join();
    }
    server.close_listener();
    if (gate) gate->stop();
  }
};

result<std::unique_ptr<http_server>> http_server::start(http_server_options options, const live_snapshot& snapshot) {
  auto state = std::make_unique<impl>(std::move(options), snapshot);
  impl& s = *state;
  if (::pipe2(s.wake_pipe, O_CLOEXEC) != 0) {
    return make_error(error_code::invalid_argument,
                      std::string("http server: cannot make its wake pipe: ") + std::strerror(errno));
  }
  s.server.set_payload_max_length(s.options.max_request_bytes);
  s.routes();
  const std::string where = s.options.host + ":" + std::to_string(s.options.port);
  if (s.options.port == 0) {
    s.port = s.server.bind_to_any_port(s.options.host);
    if (s.port <= 0) return make_error(error_code::invalid_argument, "http listen " + where + ": cannot bind");
  } else {
    if (!s.server.bind_to_port(s.options.host, s.options.port)) {
      return make_error(error_code::invalid_argument,
                        "http listen " + where + ": cannot bind (address in use, or not an address of this machine)");
    }
    s.port = s.options.port;
  }
  (void)s.server.widen_backlog(k_listen_backlog);  // on failure the library's small backlog stays: slower, not broken
  const auto timeout = s.options.request_timeout;
  const auto max_bytes = s.options.max_request_bytes;
  s.gate = std::make_unique<http_detail::connection_gate>(
      s.options.workers, s.options.max_waiting, s.options.idle_timeout,
      [&s, timeout, max_bytes](int fd) { s.server.serve(fd, steady::now() + timeout, max_bytes); });
  s.listener = std::thread([&s, timeout] { s.server.accept_until_woken(*s.gate, s.wake_pipe[0], timeout); });
  return std::unique_ptr<http_server>(new http_server(std::move(state)));
}

http_server::http_server(std::unique_ptr<impl> state) : impl_(std::move(state)) {}
http_server::~http_server() { stop(); }
void http_server::stop() {
  if (impl_) impl_->stop();
}
int http_server::port() const { return impl_->port; }

}  // namespace dewmargin
