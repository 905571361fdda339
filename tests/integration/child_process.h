#pragma once
// A child process started by fork/exec and stopped by its PID, for integration tests
// (the broker, openssl, a service that must be killed). Every wait is bounded.
//
// It never outlives the test process, even one that aborts or that ctest kills at its
// timeout: a small watcher process sits between the test and the program, holding the
// read end of a pipe whose write end only the test holds. When that end closes, the
// watcher kills the program. (PR_SET_PDEATHSIG would not do: mosquitto started as root
// changes its user, which clears it.) Signals go to the program's own PID; the watcher
// exits with the program's status.
#include <sys/types.h>

#include <chrono>
#include <filesystem>
#include <optional>
#include <string>
#include <vector>

namespace dewmargin::test_support {

class child_process {
 public:
  child_process() = default;
  // Starts argv[0] (a path, not searched in PATH). stdout and stderr are appended to
  // output_file when one is given, otherwise they go where the test's own go.
  // Throws std::runtime_error when fork fails; a failed exec shows as exit status 127.
  static child_process spawn(const std::vector<std::string>& argv, const std::filesystem::path& output_file = {});

  child_process(child_process&& other) noexcept;
  child_process& operator=(child_process&& other) noexcept;
  child_process(const child_process&) = delete;
  child_process& operator=(const child_process&) = delete;
  ~child_process();  // kills a child still running

  [[nodiscard]] pid_t pid() const { return pid_; }
  // True while the child has not exited (reaps it when it has).
  [[nodiscard]] bool running();
  // Waits up to timeout for the child to exit; its exit code (128 + signal when killed
  // by one), or nullopt when it is still running.
  std::optional<int> wait_for(std::chrono::milliseconds timeout);
  // SIGTERM, then SIGKILL when it has not exited within grace. Returns the exit code.
  int terminate(std::chrono::milliseconds grace);
  // SIGKILL at once (a crash, a power cut) and reap.
  int kill_now();
  // Sends a signal (SIGSTOP, SIGCONT, ...) without waiting. False when not running.
  bool send_signal(int signal_number);

 private:
  child_process(pid_t pid, pid_t watcher, int lifeline) : pid_(pid), watcher_(watcher), lifeline_(lifeline) {}
  void release();
  pid_t pid_ = -1;      // the program: signals go here
  pid_t watcher_ = -1;  // our child: waited for
  int lifeline_ = -1;   // write end of the pipe the watcher watches
  std::optional<int> exit_code_;
};

// Runs a program to completion within timeout; throws std::runtime_error naming the
// command, its exit code and its output when it fails or takes too long.
void run_checked(const std::vector<std::string>& argv, std::chrono::milliseconds timeout,
                 const std::filesystem::path& output_file);

// Text of a file (empty when it cannot be read), for failure messages.
std::string read_text_file(const std::filesystem::path& file);

}  // namespace dewmargin::test_support
