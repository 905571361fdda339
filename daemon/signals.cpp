#include "signals.h"

#include <sys/signalfd.h>
#include <unistd.h>

#include <cerrno>
#include <csignal>
#include <cstring>
#include <stdexcept>
#include <string>

namespace dewmargin::daemon {

signal_inbox::signal_inbox() {
  sigset_t mask;
  sigemptyset(&mask);
  sigaddset(&mask, SIGTERM);
  sigaddset(&mask, SIGINT);
  sigaddset(&mask, SIGHUP);
  if (pthread_sigmask(SIG_BLOCK, &mask, nullptr) != 0) throw std::runtime_error("cannot block signals");
  fd_ = signalfd(-1, &mask, SFD_NONBLOCK | SFD_CLOEXEC);
  if (fd_ < 0) throw std::runtime_error(std::string("signalfd: ") + std::strerror(errno));
}

signal_inbox::~signal_inbox() {
  if (fd_ >= 0) close(fd_);
}

signal_request signal_inbox::poll() {
  signalfd_siginfo info{};
  const ssize_t n = read(fd_, &info, sizeof info);
  if (n != static_cast<ssize_t>(sizeof info)) return signal_request::none;
  if (info.ssi_signo == SIGHUP) return signal_request::reload;
  return signal_request::stop;
}

}  // namespace dewmargin::daemon
