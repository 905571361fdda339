// The shell of `dewmargin watch`: broker connection (Paho MQTT C++), signals, keys and the
// screen. What is shown is decided by the pure parts (live_book, watch_screen,
// watch_commands); this file only moves messages, keys and frames.
#include <mqtt/async_client.h>
#include <poll.h>
#include <signal.h>
#include <sys/signalfd.h>
#include <unistd.h>

#include <atomic>
#include <chrono>
#include <cstdlib>
#include <functional>
#include <iostream>
#include <memory>
#include <optional>
#include <thread>

#include "../commands.h"
#include "dewmargin/broker_tls.h"
#include "dewmargin/broker_uri.h"
#include "dewmargin/config_loader.h"
#include "dewmargin/live_book.h"
#include "dewmargin/secret_file.h"
#include "watch_command.h"
#include "watch_commands.h"
#include "watch_screen.h"
#include "watch_terminal.h"

namespace dewmargin::cli {
namespace {

using steady = std::chrono::steady_clock;
using namespace std::chrono_literals;

constexpr auto k_frame = 200ms;  // at most five redraws a second
constexpr auto k_refresh = 1s;   // ages and the clock move even without messages
constexpr auto k_poll = 50ms;    // keys, signals and messages are looked at this often
constexpr auto k_connect_retry = 2s;
constexpr auto k_quiet = 300ms;    // --once: the retained messages have arrived
constexpr auto k_settle_max = 5s;  // --once: longest wait for them after subscribing
constexpr auto k_answer_timeout = 5s;
constexpr int k_qos = 1;

timestamp wall_now() {
  return std::chrono::time_point_cast<std::chrono::milliseconds>(std::chrono::system_clock::now());
}

struct connection_settings {
  std::string uri;
  std::string username;
  std::string password;
  tls_config tls;  // used with an ssl:// or mqtts:// uri
  int keepalive_s = 30;
  std::vector<std::string> prefixes;
};

// Settings from the config file and the options; the error is one line.
result<connection_settings> settings_from(const watch_options& o) {
  connection_settings s;
  std::string password_file = o.password_file;
  if (!o.config_file.empty()) {
    const auto loaded = load_config_file(o.config_file);
    if (!loaded.ok()) {
      std::string all;
      for (const auto& d : loaded.errors) all += (all.empty() ? "" : "\n") + d.to_string();
      return make_error(error_code::invalid_argument, all);
    }
    const site_config& cfg = *loaded.config;
    s.uri = cfg.broker.uri;
    s.username = cfg.broker.username;
    if (password_file.empty()) password_file = cfg.broker.password_file;
    if (cfg.broker.tls) s.tls = *cfg.broker.tls;
    s.keepalive_s = static_cast<int>(cfg.broker.keepalive_s);
    s.prefixes = {cfg.publish.prefix};
  }
  if (!o.broker.empty()) s.uri = o.broker;
  if (!o.username.empty()) s.username = o.username;
  if (!o.ca_file.empty()) s.tls.ca_file = o.ca_file;
  if (!o.prefixes.empty()) s.prefixes = o.prefixes;
  if (s.uri.empty())
    return make_error(error_code::invalid_argument, "give --config FILE, or --broker URI and --prefix P");
  if (s.prefixes.empty()) s.prefixes = {"dewmargin"};
  if (!broker_transport_of(s.uri)) {
    return make_error(error_code::invalid_argument,
                      "--broker '" + s.uri + "' must start with " + accepted_broker_schemes());
  }
  for (const auto& p : s.prefixes) {
    if (p.empty() || p.find_first_of("+#") != std::string::npos || p.front() == '/' || p.back() == '/') {
      return make_error(error_code::invalid_argument,
                        "--prefix '" + p + "' must be a topic prefix without '+', '#' or a leading or trailing '/'");
    }
  }
  if (!password_file.empty()) {
    auto secret = read_secret_file(password_file);
    if (!secret) return make_error(error_code::out_of_range, "broker password file " + secret.err().message);
    s.password = std::move(secret).value();
  }
  return s;
}

mqtt::connect_options connect_options_for(const connection_settings& s) {
  mqtt::connect_options c;
  c.set_mqtt_version(MQTTVERSION_3_1_1);
  c.set_clean_session(true);  // a viewer leaves no session behind on the broker
  c.set_keep_alive_interval(s.keepalive_s);
  c.set_connect_timeout(5);
  c.set_automatic_reconnect(1, 8);
  if (!s.username.empty()) c.set_user_name(s.username);
  if (!s.password.empty()) c.set_password(s.password);
  if (broker_transport_of(s.uri) == broker_transport::tls) c.set_ssl(broker_ssl_options(s.tls));
  return c;
}

std::string client_id() {
  char host[64] = {};
  ::gethostname(host, sizeof host - 1);
  return "dewmargin-watch-" + std::string(host) + "-" + std::to_string(::getpid());
}

// Signals arrive on a descriptor read by the loop: no handler, no flag. Blocked before the
// client library starts its threads, so they inherit the mask.
class signal_channel {
 public:
  signal_channel() {
    sigemptyset(&set_);
    for (int s : {SIGINT, SIGTERM, SIGHUP, SIGWINCH}) sigaddset(&set_, s);
    ::pthread_sigmask(SIG_BLOCK, &set_, &old_);
    fd_ = ::signalfd(-1, &set_, SFD_CLOEXEC | SFD_NONBLOCK);
  }
  signal_channel(const signal_channel&) = delete;
  signal_channel& operator=(const signal_channel&) = delete;
  ~signal_channel() {
    if (fd_ >= 0) ::close(fd_);
    ::pthread_sigmask(SIG_SETMASK, &old_, nullptr);
  }
  [[nodiscard]] int fd() const { return fd_; }
  // The next pending signal number, 0 when none.
  int next() const {
    signalfd_siginfo info{};
    if (fd_ < 0 || ::read(fd_, &info, sizeof info) != static_cast<ssize_t>(sizeof info)) return 0;
    return static_cast<int>(info.ssi_signo);
  }

 private:
  sigset_t set_{};
  sigset_t old_{};
  int fd_ = -1;
};

// The broker side: connect (retried), subscribe on every (re)connect, take messages.
class broker_feed {
 public:
  broker_feed(const connection_settings& s, std::vector<std::string> filters)
      : uri_(s.uri), options_(connect_options_for(s)), filters_(std::move(filters)) {
    mqtt::create_options create(MQTTVERSION_3_1_1);
    client_ = std::make_unique<mqtt::async_client>(s.uri, client_id(), create, nullptr);
    client_->set_connected_handler([this](const std::string&) { ++connects_; });
    client_->start_consuming();
  }
  broker_feed(const broker_feed&) = delete;
  broker_feed& operator=(const broker_feed&) = delete;
  ~broker_feed() {
    try {
      if (client_->is_connected()) client_->disconnect()->wait_for(1s);
    } catch (const mqtt::exception&) {
      // Leaving anyway: the broker drops a clean session by itself.
    }
    client_->stop_consuming();
  }

  // One pass: starts or checks the connect, subscribes after each new connection.
  void step() {
    const auto now = steady::now();
    if (connecting_) {
      try {
        if (connecting_->wait_for(0ms)) connecting_.reset();
      } catch (const mqtt::exception& e) {
        state_ = std::string("cannot connect: ") + e.what();
        connecting_.reset();
        next_attempt_ = now + k_connect_retry;
      }
    } else if (!client_->is_connected() && !ever_connected_ && now >= next_attempt_) {
      try {
        connecting_ = client_->connect(options_);
      } catch (const mqtt::exception& e) {
        state_ = std::string("cannot connect: ") + e.what();
        next_attempt_ = now + k_connect_retry;
      }
    }
    if (client_->is_connected()) {
      ever_connected_ = true;  // from here on the library reconnects by itself
      const int seen = connects_.load();
      if (seen != subscribed_for_) {
        subscribed_for_ = seen;
        try {
          std::vector<int> qos(filters_.size(), k_qos);
          subscribing_ = client_->subscribe(mqtt::string_collection::create(filters_), qos);
        } catch (const mqtt::exception& e) {
          state_ = std::string("cannot subscribe: ") + e.what();
        }
      }
      if (subscribing_) {
        try {
          if (subscribing_->wait_for(0ms)) {
            subscribing_.reset();
            subscribed_at_ = now;
            state_ = "connected";
          }
        } catch (const mqtt::exception& e) {
          subscribing_.reset();
          state_ = std::string("subscribe refused: ") + e.what();
        }
      }
    } else if (ever_connected_) {
      state_ = "connection lost, reconnecting";
      subscribed_at_.reset();
    } else if (state_.empty()) {
      state_ = "connecting";
    }
  }

  bool next(mqtt::const_message_ptr& msg) { return client_->try_consume_message(&msg); }

  // Empty string when accepted for delivery; otherwise why not.
  std::string publish(const std::string& topic, const std::string& payload) {
    if (!client_->is_connected()) return "not connected to the broker";
    try {
      client_->publish(topic, payload.data(), payload.size(), k_qos, false);
      return {};
    } catch (const mqtt::exception& e) {
      return std::string("publish failed: ") + e.what();
    }
  }

  [[nodiscard]] const std::string& state() const { return state_; }
  [[nodiscard]] const std::string& uri() const { return uri_; }
  [[nodiscard]] std::optional<steady::time_point> subscribed_at() const { return subscribed_at_; }

 private:
  std::string uri_;
  mqtt::connect_options options_;
  std::vector<std::string> filters_;
  std::unique_ptr<mqtt::async_client> client_;
  std::atomic<int> connects_{0};
  int subscribed_for_ = 0;
  bool ever_connected_ = false;
  mqtt::token_ptr connecting_;
  mqtt::token_ptr subscribing_;
  steady::time_point next_attempt_{};
  std::optional<steady::time_point> subscribed_at_;
  std::string state_;
};

void take(broker_feed& feed, live::live_book& book, const std::function<void(const live::ingest_outcome&)>& seen) {
  mqtt::const_message_ptr msg;
  while (feed.next(msg)) {
    if (!msg) continue;  // connection lost: the feed's state says so
    const auto outcome = book.ingest(msg->get_topic(), msg->get_payload_str());
    seen(outcome);
  }
}

bool colour_wanted(int fd) {
  const char* no_colour = std::getenv("NO_COLOR");
  return ::isatty(fd) == 1 && (no_colour == nullptr || *no_colour == '\0');
}

int run_once(const watch_options& o, broker_feed& feed, live::live_book& book, std::ostream& out, std::ostream& err) {
  const auto start = steady::now();
  const auto give_up = start + std::chrono::milliseconds(static_cast<long long>(o.wait_s * 1000));
  auto last_message = steady::now();
  std::string bad_payload;
  for (;;) {
    feed.step();
    bool any = false;
    take(feed, book, [&](const live::ingest_outcome& r) {
      any = true;
      if (!r.error.empty() && bad_payload.empty()) bad_payload = r.error;
    });
    const auto now = steady::now();
    if (any) last_message = now;
    if (const auto sub = feed.subscribed_at()) {
      // Retained messages come right after the subscription: wait until they stop.
      if (now - std::max(*sub, last_message) >= k_quiet || now - *sub >= k_settle_max) break;
    } else if (now >= give_up) {
      err << "dewmargin: watch: " << feed.uri() << ": " << feed.state() << "\n";
      return k_exit_runtime;
    }
    std::this_thread::sleep_for(10ms);
  }
  watch::screen_input in;
  in.book = &book;
  in.now = wall_now();
  in.width =
      o.width > 0 ? o.width : (::isatty(STDOUT_FILENO) == 1 ? watch::read_terminal_size(STDOUT_FILENO).columns : 80);
  in.colour = colour_wanted(STDOUT_FILENO);
  in.broker = feed.uri();
  in.connection = feed.state();
  for (const auto& line : watch::compose_screen(in)) out << line << (in.colour ? "\x1b[0m" : "") << "\n";
  if (!bad_payload.empty()) err << "dewmargin: watch: ignored a bad state: " << bad_payload << "\n";
  return k_exit_ok;
}

// The interactive view.
class interactive_view {
 public:
  interactive_view(const watch_options& o, broker_feed& feed, live::live_book& book, const signal_channel& signals)
      : o_(o), feed_(feed), book_(book), signals_(signals), by_(o.by) {}

  int run() {
    watch::terminal_session term(STDIN_FILENO, STDOUT_FILENO);
    if (!term.ok()) {
      std::cerr << "dewmargin: watch: cannot switch the terminal to raw keys; use --once for a snapshot\n";
      return k_exit_runtime;
    }
    size_ = watch::read_terminal_size(STDOUT_FILENO);
    colour_ = colour_wanted(STDOUT_FILENO);
    auto last_draw = steady::now() - k_frame;
    bool dirty = true;
    std::string last_state;
    while (!quit_) {
      feed_.step();
      if (feed_.state() != last_state) {
        last_state = feed_.state();
        dirty = true;
      }
      take(feed_, book_, [&](const live::ingest_outcome& r) {
        dirty = dirty || r.changed;
        if (!r.error.empty()) message_ = "ignored a bad state: " + r.error;
        if (r.event) dirty = answer(r) || dirty;
      });
      if (waiting_ && steady::now() - waiting_->sent > k_answer_timeout) {
        message_ = "no answer to '" + waiting_->what + "' within 5 s: is the service running?";
        waiting_.reset();
        dirty = true;
      }
      pollfd fds[2] = {{STDIN_FILENO, POLLIN, 0}, {signals_.fd(), POLLIN, 0}};
      if (::poll(fds, 2, static_cast<int>(k_poll.count())) > 0) {
        if (fds[1].revents & POLLIN) dirty = on_signals() || dirty;
        if (fds[0].revents & (POLLIN | POLLHUP)) dirty = on_keys() || dirty;
      }
      const auto now = steady::now();
      if ((dirty && now - last_draw >= k_frame) || now - last_draw >= k_refresh) {
        term.draw(frame());
        last_draw = now;
        dirty = false;
      }
    }
    return k_exit_ok;
  }

 private:
  struct pending_answer {
    std::size_t site;
    std::string zone;
    std::string what;
    steady::time_point sent;
  };

  std::vector<std::string> frame() const {
    watch::screen_input in;
    in.book = &book_;
    in.now = wall_now();
    in.width = size_.columns;
    in.height = size_.rows;
    in.colour = colour_;
    in.broker = feed_.uri();
    in.connection = feed_.state();
    in.message =
        message_.empty() ? "keys: q quit | a ZONE ack | s ZONE MIN shelve | u ZONE unshelve | Enter sends" : message_;
    in.prompt = (asking_initials_ ? "your initials: " : "> ") + line_ + "_";
    return watch::compose_screen(in);
  }

  bool on_signals() {
    for (int s = signals_.next(); s != 0; s = signals_.next()) {
      if (s == SIGWINCH)
        size_ = watch::read_terminal_size(STDOUT_FILENO);
      else
        quit_ = true;  // SIGINT (Ctrl-C), SIGTERM, SIGHUP
    }
    return true;
  }

  bool on_keys() {
    char buf[256];
    const ssize_t n = ::read(STDIN_FILENO, buf, sizeof buf);
    if (n == 0) {
      quit_ = true;  // the terminal went away
      return false;
    }
    for (ssize_t i = 0; i < n; ++i) {
      const char c = buf[i];
      if (c == '\x1b') {
        // Escape clears the line; the rest of an escape sequence (arrow keys) is dropped.
        line_.clear();
        asking_initials_ = false;
        break;
      }
      if (c == '\r' || c == '\n') {
        submit();
      } else if (c == 0x7f || c == '\b') {
        if (!line_.empty()) line_.pop_back();
      } else if (c == 0x15) {
        line_.clear();  // Ctrl-U
      } else if (c == 'q' && line_.empty() && !asking_initials_) {
        quit_ = true;
        return false;
      } else if (static_cast<unsigned char>(c) >= 0x20 && line_.size() < 200) {
        line_ += c;
      }
    }
    return true;
  }

  void submit() {
    std::string typed;
    typed.swap(line_);
    if (asking_initials_) {
      asking_initials_ = false;
      if (!watch::valid_initials(typed)) {
        message_ = "initials must be 1 to 16 characters without blanks; command not sent";
        pending_.reset();
        return;
      }
      by_ = typed;
      if (pending_) send(*pending_);
      pending_.reset();
      return;
    }
    if (typed.find_first_not_of(' ') == std::string::npos) return;
    auto request = watch::parse_operator_line(typed);
    if (!request) {
      message_ = request.err().message;
      return;
    }
    if (by_.empty()) {
      pending_ = request.value();
      asking_initials_ = true;
      message_ = "who gives this command? type your initials (asked once), Enter";
      return;
    }
    send(request.value());
  }

  void send(const watch::operator_request& r) {
    const auto zone = book_.find_zone(r.zone);
    if (!zone) {
      message_ = zone.err().message;
      return;
    }
    const live::zone_entry& z = *zone.value();
    const std::string& prefix = book_.sites()[z.site].prefix;
    const std::string topic = prefix + "/cmd/" + r.verb;
    const std::string why = feed_.publish(topic, watch::command_payload(r, z.view.zone, by_));
    if (!why.empty()) {
      message_ = r.verb + " " + z.view.zone + " not sent: " + why;
      return;
    }
    message_ = "sent " + r.verb + " " + z.view.zone + " as " + by_ + "; waiting for the service...";
    waiting_ = pending_answer{z.site, z.view.zone, r.verb + " " + z.view.zone, steady::now()};
  }

  // The service's answer to our last command: its event, or a rejection.
  bool answer(const live::ingest_outcome& r) {
    if (!waiting_ || r.site != waiting_->site || !r.event) return false;
    const auto& e = *r.event;
    const bool ours = e.zone == waiting_->zone || (e.kind == "rejected" && e.zone.empty());
    if (!ours || (e.kind != "ack" && e.kind != "shelve" && e.kind != "unshelve" && e.kind != "rejected")) return false;
    message_ = "service answer: " + e.text;
    waiting_.reset();
    return true;
  }

  const watch_options& o_;
  broker_feed& feed_;
  live::live_book& book_;
  const signal_channel& signals_;
  std::string by_;
  watch::terminal_size size_;
  bool colour_ = false;
  bool quit_ = false;
  std::string line_;
  std::string message_;
  bool asking_initials_ = false;
  std::optional<watch::operator_request> pending_;
  std::optional<pending_answer> waiting_;
};

}  // namespace

int run_watch(const watch_options& o, std::ostream& out, std::ostream& err) {
  if (!o.by.empty() && !watch::valid_initials(o.by)) {
    err << "dewmargin: watch: --by '" << o.by << "' must be 1 to 16 characters without blanks\n";
    return k_exit_usage;
  }
  if (!o.once && (::isatty(STDIN_FILENO) != 1 || ::isatty(STDOUT_FILENO) != 1)) {
    err << "dewmargin: watch: the live view needs a terminal; use --once for a snapshot\n";
    return k_exit_usage;
  }
  auto settings = settings_from(o);
  if (!settings) {
    // Config errors are already FILE:LINE:COL lines; the others get the program's name.
    const bool located = !o.config_file.empty() && settings.err().message.rfind(o.config_file, 0) == 0;
    err << (located ? "" : "dewmargin: watch: ") << settings.err().message << "\n";
    return settings.err().code == error_code::out_of_range ? k_exit_runtime : k_exit_usage;
  }
  const signal_channel signals;  // before the client library starts its threads
  live::live_book book(settings.value().prefixes);
  try {
    broker_feed feed(settings.value(), book.subscriptions(/*with_events=*/!o.once));
    if (o.once) return run_once(o, feed, book, out, err);
    interactive_view view(o, feed, book, signals);
    return view.run();
  } catch (const mqtt::exception& e) {
    err << "dewmargin: watch: " << settings.value().uri << ": " << e.what() << "\n";
    return k_exit_runtime;
  }
}

}  // namespace dewmargin::cli
