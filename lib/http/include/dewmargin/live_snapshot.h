#pragma once
// The hand-over between the service's worker and the HTTP server: the latest published
// state of each zone, loop and dehumidifier, each zone's margin over the last hour, and the
// service's counters. The worker writes (a short lock around a map assignment; it never
// waits on a client); server threads take a copy and work on that. A payload is parsed
// for the margin history before the lock is taken.
#include <cstdint>
#include <map>
#include <mutex>
#include <string>
#include <vector>

#include "dewmargin/margin_history.h"

namespace dewmargin {

// Totals since the service started (the worker adds up what each part counts).
struct service_counters {
  std::uint64_t messages_received = 0;      // inbound MQTT messages
  std::uint64_t bad_inputs = 0;             // readings rejected: undecodable, implausible, out of order
  std::uint64_t commands_rejected = 0;      // operator commands answered with `rejected`
  std::uint64_t broker_reconnects = 0;      // connections after the first
  std::uint64_t store_write_errors = 0;     // failed history commits and maintenance steps
  std::uint64_t inbound_drops = 0;          // received messages dropped from the full inbound queue
  std::uint64_t outbox_drops = 0;           // events dropped from the full outbox (states, commands: never)
  std::uint64_t store_commits = 0;          // successful history commits...
  std::uint64_t store_commit_us_total = 0;  // ...and the time they took
  bool broker_connected = false;
};

class live_snapshot {
 public:
  // prefix: the service's publish prefix; other topics are ignored.
  explicit live_snapshot(std::string prefix, std::string site = {}, std::string version = {});

  // Worker: every published message may be offered; retained state topics are kept.
  void on_published(const std::string& topic, const std::string& payload);
  void set_counters(const service_counters& counters);

  struct copy {
    std::string prefix;
    std::string site;
    std::string version;
    std::map<std::string, std::string> states;  // topic -> payload, retained states only
    service_counters counters;
    std::map<std::string, std::vector<live::margin_point>> margins;  // zone -> series (with_history)
  };
  [[nodiscard]] copy take(bool with_history) const;

 private:
  const std::string prefix_;
  const std::string site_;
  const std::string version_;
  mutable std::mutex mutex_;
  std::map<std::string, std::string> states_;
  service_counters counters_;
  live::margin_history history_;
};

}  // namespace dewmargin
