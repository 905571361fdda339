#include "connection_gate.h"

#include <fcntl.h>
#include <sys/socket.h>
#include <unistd.h>

#include <algorithm>
#include <optional>

namespace dewmargin::http_detail {
namespace {

void close_connection(int fd) {
  ::shutdown(fd, SHUT_RDWR);
  ::close(fd);
}

}  // namespace

connection_gate::connection_gate(std::size_t workers, std::size_t max_waiting, std::chrono::milliseconds idle_timeout,
                                 serve_fn serve)
    : max_waiting_(std::max<std::size_t>(1, max_waiting)),
      max_ready_(std::max<std::size_t>(8, workers * 16)),
      idle_timeout_(idle_timeout),
      serve_(std::move(serve)) {
  if (::pipe2(wake_pipe_, O_CLOEXEC | O_NONBLOCK) != 0) wake_pipe_[0] = wake_pipe_[1] = -1;
  watcher_ = std::thread([this] { watch_loop(); });
  for (std::size_t i = 0; i < std::max<std::size_t>(1, workers); ++i) workers_.emplace_back([this] { work_loop(); });
}

connection_gate::~connection_gate() {
  stop();
  for (int fd : wake_pipe_) {
    if (fd >= 0) ::close(fd);
  }
}

void connection_gate::wake() {
  if (wake_pipe_[1] >= 0) {
    const char c = 1;
    (void)!::write(wake_pipe_[1], &c, 1);
  }
}

void connection_gate::admit(int fd) {
  std::optional<int> evicted;
  {
    const std::lock_guard<std::mutex> lock(mutex_);
    if (stopping_) {
      close_connection(fd);
      return;
    }
    if (waiting_.size() >= max_waiting_) {
      // Full: the connection that has waited longest without a word goes.
      evicted = waiting_.front().fd;
      waiting_.pop_front();
    }
    waiting_.push_back({fd, std::chrono::steady_clock::now() + idle_timeout_});
  }
  if (evicted) close_connection(*evicted);
  wake();
}

void connection_gate::watch_loop() {
  std::vector<pollfd> fds;
  std::vector<waiting> snapshot;
  for (;;) {
    auto now = std::chrono::steady_clock::now();
    auto next_deadline = now + std::chrono::seconds(1);
    {
      std::lock_guard<std::mutex> lock(mutex_);
      if (stopping_) return;
      // Expired connections go; the rest are watched.
      std::vector<int> expired;
      for (auto it = waiting_.begin(); it != waiting_.end();) {
        if (it->deadline <= now) {
          expired.push_back(it->fd);
          it = waiting_.erase(it);
        } else {
          next_deadline = std::min(next_deadline, it->deadline);
          ++it;
        }
      }
      for (int fd : expired) close_connection(fd);
      snapshot.assign(waiting_.begin(), waiting_.end());
    }
    fds.clear();
    fds.push_back({wake_pipe_[0], POLLIN, 0});
    for (const auto& w : snapshot) fds.push_back({w.fd, POLLIN, 0});
    const auto wait_ms = std::chrono::duration_cast<std::chrono::milliseconds>(next_deadline - now).count();
    const int n = ::poll(fds.data(), fds.size(), static_cast<int>(std::max<long long>(1, wait_ms)));
    if (n <= 0) continue;
    if (fds[0].revents & POLLIN) {
      char buf[64];
      while (::read(wake_pipe_[0], buf, sizeof buf) > 0) {
      }
    }
    std::vector<int> became_ready;
    for (std::size_t i = 1; i < fds.size(); ++i) {
      if (fds[i].revents & (POLLIN | POLLHUP | POLLERR)) became_ready.push_back(fds[i].fd);
    }
    if (became_ready.empty()) continue;
    std::vector<int> refused;
    {
      std::lock_guard<std::mutex> lock(mutex_);
      for (int fd : became_ready) {
        const auto it = std::find_if(waiting_.begin(), waiting_.end(), [&](const waiting& w) { return w.fd == fd; });
        if (it == waiting_.end()) continue;  // evicted meanwhile (already closed)
        waiting_.erase(it);
        if (ready_.size() >= max_ready_) {
          refused.push_back(fd);  // the workers are far behind: shed load instead of queueing
        } else {
          ready_.push_back(fd);
        }
      }
    }
    for (int fd : refused) close_connection(fd);
    ready_cv_.notify_all();
  }
}

void connection_gate::work_loop() {
  for (;;) {
    int fd = -1;
    {
      std::unique_lock<std::mutex> lock(mutex_);
      ready_cv_.wait(lock, [&] { return stopping_ || !ready_.empty(); });
      if (stopping_) return;
      fd = ready_.front();
      ready_.pop_front();
    }
    serve_(fd);
  }
}

void connection_gate::stop() {
  std::deque<waiting> idle;
  std::deque<int> ready;
  {
    const std::lock_guard<std::mutex> lock(mutex_);
    if (stopping_) return;
    stopping_ = true;
    idle.swap(waiting_);
    ready.swap(ready_);
  }
  wake();
  ready_cv_.notify_all();
  if (watcher_.joinable()) watcher_.join();
  for (auto& t : workers_) {
    if (t.joinable()) t.join();
  }
  for (const auto& w : idle) close_connection(w.fd);
  for (int fd : ready) close_connection(fd);
}

}  // namespace dewmargin::http_detail
