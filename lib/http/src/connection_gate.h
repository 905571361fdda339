#pragma once
// Accepted connections wait here, costing a descriptor and no thread, until their first
// bytes arrive; then one of a few workers serves them. Idle connections (a browser's
// speculative ones, a port scan, a slow client) therefore never hold a worker, and the
// waiting room is bounded in number and in time.
#include <poll.h>

#include <chrono>
#include <condition_variable>
#include <cstddef>
#include <deque>
#include <functional>
#include <mutex>
#include <thread>
#include <vector>

namespace dewmargin::http_detail {

class connection_gate {
 public:
  using serve_fn = std::function<void(int fd)>;  // serves one request and closes fd

  connection_gate(std::size_t workers, std::size_t max_waiting, std::chrono::milliseconds idle_timeout, serve_fn serve);
  connection_gate(const connection_gate&) = delete;
  connection_gate& operator=(const connection_gate&) = delete;
  ~connection_gate();

  void admit(int fd);  // from the accept loop: never blocks
  void stop();         // closes every waiting connection, joins the threads

 private:
  struct waiting {
    int fd;
    std::chrono::steady_clock::time_point deadline;
  };
  void watch_loop();
  void work_loop();
  void wake();

  const std::size_t max_waiting_;
  const std::size_t max_ready_;
  const std::chrono::milliseconds idle_timeout_;
  serve_fn serve_;
  int wake_pipe_[2] = {-1, -1};
  std::mutex mutex_;
  std::condition_variable ready_cv_;
  std::deque<waiting> waiting_;
  std::deque<int> ready_;
  bool stopping_ = false;
  std::thread watcher_;
  std::vector<std::thread> workers_;
};

}  // namespace dewmargin::http_detail
