#pragma once
// Containment of one inbound message's faults: an exception while the core handles one
// message must not stop supervision of every zone. Such a message is dropped, counted, and
// reported at most once per interval (the first of each interval names the topic and the
// error; the next report says how many were dropped meanwhile).
//
// What is contained and what is not:
// - contained: any std::exception other than those below, thrown while handling one
//   message (a decoder or JSON library refusing what came from outside);
// - not contained, rethrown to stop the service loudly (systemd restarts it):
//   std::bad_alloc (the process is out of memory, not the message at fault),
//   std::logic_error and its kin (a broken invariant: the program is wrong, and going on
//   could act on corrupt state), and anything that is not a std::exception.
// Only the core's on_message() runs inside; ticks, publishing and storing never do.
#include <chrono>
#include <cstdint>
#include <exception>
#include <functional>
#include <new>
#include <optional>
#include <stdexcept>
#include <string>

namespace dewmargin::daemon {

// Topics and error texts are quoted in reports as safe_text.h's text_excerpt() of at most
// this many bytes: valid UTF-8, control characters escaped, cut between characters.
inline constexpr std::size_t k_report_bytes = 200;

struct containment_report {
  std::string topic;                 // safe text (text_excerpt)
  std::string error;                 // safe text (text_excerpt)
  std::uint64_t dropped_since_last;  // messages dropped since the previous report, this one excluded
};

class message_containment {
 public:
  using clock = std::chrono::steady_clock;
  using reporter = std::function<void(const containment_report&)>;

  message_containment(std::chrono::seconds interval, reporter report)
      : interval_(interval), report_(std::move(report)) {}

  // Runs handle(); true when it returned, false when it threw a contained exception (the
  // message is dropped). Rethrows what is not contained (see above).
  template <typename Handle>
  bool run(const std::string& topic, Handle&& handle, clock::time_point now = clock::now()) {
    try {
      handle();
      return true;
    } catch (const std::bad_alloc&) {
      throw;
    } catch (const std::logic_error&) {
      throw;
    } catch (const std::exception& e) {
      dropped(topic, e.what(), now);
      return false;
    }
  }

  [[nodiscard]] std::uint64_t dropped_total() const { return dropped_total_; }

 private:
  void dropped(const std::string& topic, const char* what, clock::time_point now);

  std::chrono::seconds interval_;
  reporter report_;
  std::optional<clock::time_point> last_report_;
  std::uint64_t dropped_total_ = 0;
  std::uint64_t held_back_ = 0;
};

}  // namespace dewmargin::daemon
