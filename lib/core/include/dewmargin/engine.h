#pragma once
// The decision core: takes (time, topic, payload) and a once-a-second tick, keeps each
// zone's and loop's state, and returns what to publish, store and remember. No threads,
// no I/O, no clock: `now` is always a parameter, and is never allowed to go backwards
// (an earlier `now` than the last one is treated as the last one).
//
// Work per reading is O(1) in the number of zones (a hash lookup of the topic, one
// zone evaluated), except a loop's supply-water reading, which re-evaluates the loop's
// zones that fall back to the supply temperature. The tick is O(inputs + zones).
#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "dewmargin/config.h"
#include "dewmargin/engine_output.h"
#include "dewmargin/timestamp.h"

namespace dewmargin {

// Totals since start, for the shell's periodic summary line: what was counted instead of
// being reported one by one.
struct engine_counters {
  std::uint64_t messages = 0;        // everything offered to on_message
  std::uint64_t readings = 0;        // accepted sensor readings
  std::uint64_t bad_readings = 0;    // undecodable, implausible or out of order
  std::uint64_t suppressed_input_events = 0;  // bad readings that repeated their input's fault: no event
  std::uint64_t commands = 0;        // operator commands accepted
  std::uint64_t rejected = 0;        // operator commands rejected (not counting rate_limited)
  std::uint64_t suppressed_rejections = 0;    // rejections that repeated the last one: no event
  std::uint64_t rate_limited = 0;    // commands dropped over the command rate (command_guard.h)
  std::uint64_t unrouted = 0;        // messages on a topic no input uses
  std::uint64_t retained_ignored = 0; // retained measurements and commands (age unknown)
};

class engine {
 public:
  explicit engine(site_config config);
  ~engine();
  engine(const engine&) = delete;
  engine& operator=(const engine&) = delete;

  // Call once, before anything else. Publishes the initial (or restored) zone and loop
  // states, so that a restarted service shows its alarms and setpoints at once.
  void begin(timestamp now, const restored_state& restored, engine_output& out);

  // A reading or an operator command. Outputs are appended to `out`.
  // `retained`: the broker delivered it from its retained store, so its age is unknown.
  // Retained measurements and commands are ignored (a stored value must not pass for a
  // fresh one, an old command must not act again); retained switch and contact states
  // are taken, since such devices often publish only on change.
  void on_message(const std::string& topic, std::string_view payload, timestamp now, engine_output& out,
                  bool retained = false);

  // Once a second: staleness, confirm timers, shelving expiry, reset ramps, deferred
  // state publications, per-minute samples.
  void tick(timestamp now, engine_output& out);

  // Shutdown: the current minute's samples and the state to restore next time.
  void flush(timestamp now, engine_output& out);

  // Config reload: take over the previous engine's last readings (by topic and field),
  // alarms, acknowledgements, shelving, bands, valves with their reopen timers, the current
  // minute's samples and setpoints (by id). Call instead of begin().
  void adopt(const engine& previous, timestamp now, engine_output& out);

  // The broker may have lost its retained messages (restarted without persistence): every
  // retained state and plant command again, as it stands now (zone, loop and unit states;
  // valve, setpoint and dew-point request commands). The shell calls it after each reconnect.
  void republish(timestamp now, engine_output& out);

  // Exact topics of every input, plus <prefix>/cmd/#.
  [[nodiscard]] std::vector<std::string> subscriptions() const;
  // True when some input reads `topic` (a reading, not a command).
  [[nodiscard]] bool reads(const std::string& topic) const;
  [[nodiscard]] const site_config& config() const;
  [[nodiscard]] engine_counters counters() const;
  [[nodiscard]] restored_state snapshot() const;

  // Topic helpers shared with the shell.
  [[nodiscard]] std::string status_topic() const;
  [[nodiscard]] std::string events_topic() const;
  [[nodiscard]] std::string command_prefix() const;  // "<prefix>/cmd/"

  // A `service` event (start, stop, reload) as the engine would publish it.
  void service_event(timestamp now, const std::string& from, const std::string& to, const std::string& reason,
                     engine_output& out) const;

 private:
  struct state;
  std::unique_ptr<state> s_;
};

}  // namespace dewmargin
