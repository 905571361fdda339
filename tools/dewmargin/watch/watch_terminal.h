#pragma once
// The terminal side of `dewmargin watch`: raw keys, the alternate screen, the window size,
// and a redraw that does not flicker (cursor home, each row followed by clear-to-end-of-
// line, clear below; one write per frame). The terminal is restored by the destructor,
// whatever ends the program's loop.
#include <termios.h>

#include <string>
#include <vector>

namespace dewmargin::watch {

struct terminal_size {
  int columns = 80;
  int rows = 24;
};

// The size of the terminal on `fd`; 80x24 when it cannot be read.
terminal_size read_terminal_size(int fd);

class terminal_session {
 public:
  terminal_session(int in_fd, int out_fd);  // raw keys (signals still on), alternate screen, cursor hidden
  terminal_session(const terminal_session&) = delete;
  terminal_session& operator=(const terminal_session&) = delete;
  ~terminal_session();

  [[nodiscard]] bool ok() const { return ok_; }
  void draw(const std::vector<std::string>& lines) const;

 private:
  void write_all(const std::string& s) const;

  int in_fd_;
  int out_fd_;
  bool ok_ = false;
  termios saved_{};
};

}  // namespace dewmargin::watch
