#pragma once
// The service's web server, on threads of its own:
//   GET /                    the live page (no data in it; it polls the API)
//   GET /metrics             Prometheus text format (metrics_text.h)
//   GET /api/zones           the zone states, worst first, as a JSON array of the retained objects
//   GET /api/loops           the loop states
//   GET /api/dehumidifiers   the dehumidifier states
//   GET /api/margin-history  each zone's margin over the last hour (for the sparklines)
// With a token, /metrics and /api/* need "Authorization: Bearer TOKEN" (the page asks for it
// once and keeps it for the browser tab).
//
// Bounds, so that a slow or hostile client cannot take the server down or exhaust memory:
// an accepted connection waits in a waiting room that costs no thread until its first bytes
// arrive (at most max_waiting connections, the oldest closed first, each at most
// idle_timeout); a few workers serve requests one per connection (no keep-alive), each
// request within request_timeout in total and at most max_request_bytes of headers and body.
#include <chrono>
#include <cstddef>
#include <memory>
#include <string>

#include "dewmargin/live_snapshot.h"
#include "dewmargin/result.h"

namespace dewmargin {

struct http_server_options {
  std::string host = "127.0.0.1";
  int port = 8088;    // 0: any free port (tests)
  std::string token;  // empty: no token asked
  std::size_t workers = 3;
  std::size_t max_waiting = 512;
  std::chrono::milliseconds idle_timeout{10000};
  std::chrono::milliseconds request_timeout{10000};
  std::size_t max_request_bytes = 16 * 1024;
};

class http_server {
 public:
  // Binds and starts serving; the error names the address and why (in use, not allowed).
  [[nodiscard]] static result<std::unique_ptr<http_server>> start(http_server_options options,
                                                                  const live_snapshot& snapshot);
  http_server(const http_server&) = delete;
  http_server& operator=(const http_server&) = delete;
  ~http_server();

  void stop();  // idempotent; closes every connection and joins the threads
  [[nodiscard]] int port() const;

  struct impl;

 private:
  explicit http_server(std::unique_ptr<impl> state);
  std::unique_ptr<impl> impl_;
};

}  // namespace dewmargin
