#include "child_process.h"

#include <fcntl.h>
#include <poll.h>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cstring>
#include <fstream>
#include <sstream>
#include <stdexcept>
#include <thread>

namespace dewmargin::test_support {
namespace {

constexpr std::chrono::milliseconds k_poll{10};

int exit_code_of(int status) {
  if (WIFEXITED(status)) return WEXITSTATUS(status);
  if (WIFSIGNALED(status)) return 128 + WTERMSIG(status);
  return -1;
}

std::string join(const std::vector<std::string>& argv) {
  std::string s;
  for (const auto& a : argv) s += (s.empty() ? "" : " ") + a;
  return s;
}

}  // namespace

child_process child_process::spawn(const std::vector<std::string>& argv, const std::filesystem::path& output_file) {
  if (argv.empty()) {
    throw std::runtime_error("child_process::spawn: empty argv");
  }
  // Everything the children need is prepared before fork: between fork and exec a
  // multi-threaded parent's child may only make async-signal-safe calls.
  std::vector<char*> args;
  args.reserve(argv.size() + 1);
  for (const auto& a : argv) args.push_back(const_cast<char*>(a.c_str()));
  args.push_back(nullptr);
  const std::string out = output_file.string();
  const int max_fd = static_cast<int>(std::min(sysconf(_SC_OPEN_MAX), 4096L));

  int lifeline[2];
  int pid_pipe[2];
  if (pipe2(lifeline, O_CLOEXEC) != 0 || pipe2(pid_pipe, O_CLOEXEC) != 0) {
    throw std::runtime_error(std::string("pipe2 failed: ") + std::strerror(errno));
  }

  const pid_t watcher = fork();
  if (watcher < 0) {
    throw std::runtime_error(std::string("fork failed: ") + std::strerror(errno));
  }
  if (watcher == 0) {
    // The watcher. Default signals and mask: Paho ignores SIGPIPE process-wide, and a
    // blocked SIGTERM would make terminate() escalate; exec keeps both otherwise.
    sigset_t none;
    sigemptyset(&none);
    sigprocmask(SIG_SETMASK, &none, nullptr);
    signal(SIGPIPE, SIG_DFL);
    signal(SIGTERM, SIG_DFL);
    signal(SIGINT, SIG_DFL);
    const int watch_fd = lifeline[0];
    const int report_fd = pid_pipe[1];
    for (int fd = 3; fd < max_fd; ++fd) {
      if (fd != watch_fd && fd != report_fd) close(fd);  // the test's sockets, the lifeline's write end
    }
    const pid_t program = fork();
    if (program == 0) {
      close(watch_fd);
      close(report_fd);
      if (!out.empty()) {
        const int fd = open(out.c_str(), O_WRONLY | O_CREAT | O_APPEND, 0644);
        if (fd >= 0) {
          dup2(fd, STDOUT_FILENO);
          dup2(fd, STDERR_FILENO);
          close(fd);
        }
      }
      execv(args[0], args.data());
      _exit(127);
    }
    if (program < 0) _exit(126);
    (void)!write(report_fd, &program, sizeof program);
    close(report_fd);
    while (true) {
      int status = 0;
      if (waitpid(program, &status, WNOHANG) == program) _exit(exit_code_of(status) & 0xff);
      pollfd p{watch_fd, POLLIN, 0};
      if (poll(&p, 1, 20) == 1) {  // EOF: the test process is gone
        kill(program, SIGKILL);
        waitpid(program, &status, 0);
        _exit(128 + SIGKILL);
      }
    }
  }

  close(lifeline[0]);
  close(pid_pipe[1]);
  pid_t program = -1;
  const ssize_t n = read(pid_pipe[0], &program, sizeof program);
  close(pid_pipe[0]);
  if (n != static_cast<ssize_t>(sizeof program) || program <= 0) {
    close(lifeline[1]);
    int status = 0;
    waitpid(watcher, &status, 0);
    throw std::runtime_error("could not start " + join(argv));
  }
  return child_process(program, watcher, lifeline[1]);
}

child_process::child_process(child_process&& other) noexcept
    : pid_(other.pid_), watcher_(other.watcher_), lifeline_(other.lifeline_), exit_code_(other.exit_code_) {
  other.pid_ = -1;
  other.watcher_ = -1;
  other.lifeline_ = -1;
}

child_process& child_process::operator=(child_process&& other) noexcept {
  if (this != &other) {
    release();
    pid_ = other.pid_;
    watcher_ = other.watcher_;
    lifeline_ = other.lifeline_;
    exit_code_ = other.exit_code_;
    other.pid_ = -1;
    other.watcher_ = -1;
    other.lifeline_ = -1;
  }
  return *this;
}

child_process::~child_process() { release(); }

void child_process::release() {
  if (watcher_ > 0 && !exit_code_) (void)kill_now();
  if (lifeline_ >= 0) close(lifeline_);
  lifeline_ = -1;
}

bool child_process::running() {
  if (watcher_ <= 0 || exit_code_) return false;
  int status = 0;
  const pid_t r = waitpid(watcher_, &status, WNOHANG);
  if (r == watcher_) {
    exit_code_ = exit_code_of(status);
    return false;
  }
  return r == 0;
}

std::optional<int> child_process::wait_for(std::chrono::milliseconds timeout) {
  const auto deadline = std::chrono::steady_clock::now() + timeout;
  while (running()) {
    if (std::chrono::steady_clock::now() >= deadline) return std::nullopt;
    std::this_thread::sleep_for(k_poll);
  }
  return exit_code_;
}

int child_process::terminate(std::chrono::milliseconds grace) {
  if (!running()) return exit_code_.value_or(-1);
  ::kill(pid_, SIGTERM);
  if (const auto code = wait_for(grace)) return *code;
  return kill_now();
}

int child_process::kill_now() {
  if (!running()) return exit_code_.value_or(-1);
  ::kill(pid_, SIGKILL);
  int status = 0;
  while (waitpid(watcher_, &status, 0) < 0 && errno == EINTR) {
  }
  exit_code_ = exit_code_of(status);
  return *exit_code_;
}

bool child_process::send_signal(int signal_number) {
  if (!running()) return false;
  return ::kill(pid_, signal_number) == 0;
}

void run_checked(const std::vector<std::string>& argv, std::chrono::milliseconds timeout,
                 const std::filesystem::path& output_file) {
  child_process child = child_process::spawn(argv, output_file);
  const auto code = child.wait_for(timeout);
  if (!code) {
    (void)child.kill_now();
    throw std::runtime_error("timed out after " + std::to_string(timeout.count()) + " ms: " + join(argv) + "\n" +
                             read_text_file(output_file));
  }
  if (*code != 0) {
    throw std::runtime_error("exit code " + std::to_string(*code) + ": " + join(argv) + "\n" +
                             read_text_file(output_file));
  }
}

std::string read_text_file(const std::filesystem::path& file) {
  std::ifstream in(file);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

}  // namespace dewmargin::test_support
