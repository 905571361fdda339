#pragma once
// Termination and reload signals delivered through a signalfd, read by the worker loop:
// no handler, no global flag. Construct before any thread starts, so that every thread
// inherits the blocked mask and the signals reach only the descriptor.
namespace dewmargin::daemon {

enum class signal_request { none, stop, reload };

class signal_inbox {
 public:
  signal_inbox();  // blocks SIGTERM, SIGINT, SIGHUP and opens the signalfd; throws on failure
  ~signal_inbox();
  signal_inbox(const signal_inbox&) = delete;
  signal_inbox& operator=(const signal_inbox&) = delete;

  // Non-blocking: the next pending request, or none.
  signal_request poll();

 private:
  int fd_ = -1;
};

}  // namespace dewmargin::daemon
