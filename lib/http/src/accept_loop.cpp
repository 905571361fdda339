#include "accept_loop.h"

#include <fcntl.h>
#include <poll.h>
#include <sys/socket.h>

#include <cerrno>
#include <thread>

namespace dewmargin::http_detail {

int accept_connection(int listen_fd) { return ::accept4(listen_fd, nullptr, nullptr, SOCK_CLOEXEC); }

void run_accept_loop(int listen_fd, int wake_fd, const std::function<int(int listen_fd)>& accept_one,
                     const std::function<void(int fd)>& admit) {
  const int flags = ::fcntl(listen_fd, F_GETFL);
  if (flags >= 0) (void)::fcntl(listen_fd, F_SETFL, flags | O_NONBLOCK);
  pollfd fds[2] = {{listen_fd, POLLIN, 0}, {wake_fd, POLLIN, 0}};
  for (;;) {
    fds[0].revents = fds[1].revents = 0;
    if (::poll(fds, 2, -1) < 0) {
      if (errno != EINTR) std::this_thread::sleep_for(k_accept_backoff);
      continue;
    }
    if (fds[1].revents != 0) return;
    if ((fds[0].revents & POLLIN) == 0) {
      std::this_thread::sleep_for(k_accept_backoff);  // POLLERR or POLLNVAL: do not spin
      continue;
    }
    const int fd = accept_one(listen_fd);
    if (fd < 0) {
      // The peer gone before accept (ECONNABORTED), nothing there after all (EAGAIN), a
      // signal: go on at once. Anything else may leave the connection in the backlog, so
      // poll would report it again at once: wait a little first.
      if (errno != EAGAIN && errno != EWOULDBLOCK && errno != EINTR && errno != ECONNABORTED) {
        std::this_thread::sleep_for(k_accept_backoff);
      }
      continue;
    }
    admit(fd);
  }
}

}  // namespace dewmargin::http_detail
