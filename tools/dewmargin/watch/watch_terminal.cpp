#include "watch_terminal.h"

#include <sys/ioctl.h>
#include <unistd.h>

#include <cerrno>

namespace dewmargin::watch {

terminal_size read_terminal_size(int fd) {
  winsize ws{};
  if (::ioctl(fd, TIOCGWINSZ, &ws) == 0 && ws.ws_col > 0 && ws.ws_row > 0) return {ws.ws_col, ws.ws_row};
  return {};
}

terminal_session::terminal_session(int in_fd, int out_fd) : in_fd_(in_fd), out_fd_(out_fd) {
  if (::tcgetattr(in_fd_, &saved_) != 0) return;
  termios raw = saved_;
  raw.c_lflag &= static_cast<tcflag_t>(~(ICANON | ECHO));  // ISIG stays: Ctrl-C arrives as SIGINT
  raw.c_cc[VMIN] = 0;
  raw.c_cc[VTIME] = 0;
  if (::tcsetattr(in_fd_, TCSANOW, &raw) != 0) return;
  ok_ = true;
  write_all("\x1b[?1049h\x1b[?25l\x1b[H\x1b[2J");  // alternate screen, hide cursor, clear
}

terminal_session::~terminal_session() {
  if (!ok_) return;
  write_all("\x1b[0m\x1b[?25h\x1b[?1049l");  // attributes off, cursor back, main screen
  ::tcsetattr(in_fd_, TCSANOW, &saved_);
}

void terminal_session::draw(const std::vector<std::string>& lines) const {
  std::string frame = "\x1b[H";
  for (std::size_t i = 0; i < lines.size(); ++i) {
    frame += lines[i];
    frame += "\x1b[0m\x1b[K";
    if (i + 1 < lines.size()) frame += "\r\n";
  }
  frame += "\x1b[J";
  write_all(frame);
}

void terminal_session::write_all(const std::string& s) const {
  std::size_t done = 0;
  while (done < s.size()) {
    const ssize_t n = ::write(out_fd_, s.data() + done, s.size() - done);
    if (n < 0 && errno == EINTR) continue;
    if (n <= 0) return;  // the terminal is gone; nothing left to draw on
    done += static_cast<std::size_t>(n);
  }
}

}  // namespace dewmargin::watch
