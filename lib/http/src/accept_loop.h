#pragma once
// The web server's accept loop, ours rather than httplib's listen_after_bind(): that one ends
// for good on any accept() error but EMFILE, EINTR and EAGAIN (ENFILE, ENOBUFS, ENOMEM, EPROTO
// and the like), and the page and metrics would be gone while the service ran on. Here an
// error is waited out and accepting goes on until the wake descriptor becomes readable. Each
// connection goes straight to `admit` (the connection gate): accepting never waits on a client.
#include <chrono>
#include <functional>

namespace dewmargin::http_detail {

// After an error that leaves the connection in the backlog (out of descriptors or buffers),
// or a listening socket in error: wait this long rather than spin.
inline constexpr std::chrono::milliseconds k_accept_backoff{20};

// accept4(listen_fd, ..., SOCK_CLOEXEC): a new connection, or -1 with errno set.
int accept_connection(int listen_fd);

// Returns once wake_fd is readable. listen_fd is made non-blocking (poll may report a
// connection whose peer is gone by the time accept runs). `accept_one` is
// accept_connection in the server; tests make it fail.
void run_accept_loop(int listen_fd, int wake_fd, const std::function<int(int listen_fd)>& accept_one,
                     const std::function<void(int fd)>& admit);

}  // namespace dewmargin::http_detail
