#include "child_process.h"

#include <fcntl.h>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

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
  // Everything the child needs is prepared before fork: between fork and exec a
  // multi-threaded parent's child may only make async-signal-safe calls.
  std::vector<char*> args;
  args.reserve(argv.size() + 1);
  for (const auto& a : argv) args.push_back(const_cast<char*>(a.c_str()));
  args.push_back(nullptr);
  const std::string out = output_file.string();
  const long max_fd = std::min(sysconf(_SC_OPEN_MAX), 4096L);

  const pid_t pid = fork();
  if (pid < 0) {
    throw std::runtime_error(std::string("fork failed: ") + std::strerror(errno));
  }
  if (pid == 0) {
    if (!out.empty()) {
      const int fd = open(out.c_str(), O_WRONLY | O_CREAT | O_APPEND, 0644);
      if (fd >= 0) {
        dup2(fd, STDOUT_FILENO);
        dup2(fd, STDERR_FILENO);
      }
    }
    // No inherited sockets (a test's own broker connections) and default signals: Paho
    // ignores SIGPIPE process-wide, and a blocked SIGTERM would make stop() escalate.
    for (int fd = 3; fd < max_fd; ++fd) close(fd);
    sigset_t none;
    sigemptyset(&none);
    sigprocmask(SIG_SETMASK, &none, nullptr);
    signal(SIGPIPE, SIG_DFL);
    signal(SIGTERM, SIG_DFL);
    signal(SIGINT, SIG_DFL);
    execv(args[0], args.data());
    _exit(127);
  }
  return child_process(pid);
}

child_process::child_process(child_process&& other) noexcept : pid_(other.pid_), exit_code_(other.exit_code_) {
  other.pid_ = -1;
}

child_process& child_process::operator=(child_process&& other) noexcept {
  if (this != &other) {
    if (pid_ > 0 && !exit_code_) (void)kill_now();
    pid_ = other.pid_;
    exit_code_ = other.exit_code_;
    other.pid_ = -1;
  }
  return *this;
}

child_process::~child_process() {
  if (pid_ > 0 && !exit_code_) (void)kill_now();
}

bool child_process::running() {
  if (pid_ <= 0 || exit_code_) return false;
  int status = 0;
  const pid_t r = waitpid(pid_, &status, WNOHANG);
  if (r == pid_) {
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
  while (waitpid(pid_, &status, 0) < 0 && errno == EINTR) {
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
