#pragma once
// Rule: an input is stale when it has had no good reading for its stale_after_s (the zone's
// or loop's, or its own; 0 never). Switches and contacts report on change only, so they
// are never stale unless their own stale_after_s is set. An input that has never reported
// is *awaiting*, and *missing* once stale_after_s has passed since start (a measurement that is
// never stale: once its zone's wait after start is over; switches and contacts, which may
// report only on change, stay awaiting). An input that
// keeps sending bad payloads is *bad*, not stale: it turns stale only when it has also
// been silent for stale_after_s. The last good value stays in use until the input is stale.
//
// The registry keeps every configured input (one slot per topic and field), decodes
// readings into them and reports each change of state as an input_transition, one per
// change of state or kind of fault (input_fault.h), never one per message.
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <unordered_map>
#include <vector>

#include "dewmargin/config.h"
#include "dewmargin/input_decoder.h"
#include "dewmargin/input_fault.h"
#include "dewmargin/timestamp.h"

namespace dewmargin {

// A reading payload longer than this is not read: a bad input (fault `too_large`). Sensors send
// a number or a small JSON object; a megabyte on a sensor topic is a fault, not a reading.
inline constexpr std::size_t k_max_input_payload_bytes = 64 * 1024;

enum class input_status { awaiting, ok, bad, stale, missing };
const char* input_status_name(input_status s);

struct input_owner {
  bool is_loop = false;
  std::size_t index = 0;  // into the config's loops or zones (or dehumidifiers)
  bool is_dehumidifier = false;
};

// What the tick reads of every input every second (kind, status, switch state, age and value)
// comes first, within the slot's first 64 bytes, and slots start on a cache line: one line
// a slot per pass, not three (at 10,000 zones the tick is bound by memory, not arithmetic).
// 192 bytes a slot (208 before).
struct alignas(64) input_slot {
  input_kind kind = input_kind::air_temp;
  input_status status = input_status::awaiting;
  bool active = false;                    // switches: last good state
  unsigned faults_reported = 0;           // while bad: the kinds already reported (a bit each)
  double stale_after_s = 0.0;             // 0: never stale
  double grace_s = 0.0;                   // after start, how long its zone waits for its first reading
  std::optional<double> value;            // last good value, core units
  std::optional<timestamp> last_reading;  // last good reading
  std::optional<timestamp> last_message;  // last payload of any kind
  const input_config* cfg = nullptr;
  input_owner owner;
  std::string last_switch_payload;   // switches: the payload of that state (decoded again
                                     // when a reload changes the active/inactive words)
  std::optional<input_fault> fault;  // while bad: the kind of fault last reported
  std::string bad_reason;            // while bad: the reason of the first message of that kind
  std::uint64_t bad_messages = 0;    // bad messages since the input last turned bad

  [[nodiscard]] bool fresh(timestamp now) const;
  // Not fresh, and not merely waiting for its first reading.
  [[nodiscard]] bool faulted(timestamp now) const { return !fresh(now) && status != input_status::awaiting; }
  // Never reported, and still within the time its zone waits for it after start.
  [[nodiscard]] bool awaited(double since_start_s) const {
    return status == input_status::awaiting && since_start_s < grace_s;
  }
  // The last good value while fresh.
  [[nodiscard]] std::optional<double> fresh_value(timestamp now) const;
};

// A change of an input's state, reported as an `input` event.
struct input_transition {
  std::size_t slot = 0;
  input_status from = input_status::awaiting;
  input_status to = input_status::ok;
  std::string reason;
  std::optional<input_fault> fault;           // when it turns (or stays) bad
  std::optional<std::uint64_t> bad_messages;  // when it stops being bad
};

struct input_counts {
  std::uint64_t readings = 0;                // accepted
  std::uint64_t bad_readings = 0;            // undecodable, implausible or out of order
  std::uint64_t suppressed_transitions = 0;  // bad readings that repeated a reported fault
};

class input_registry {
 public:
  // `default_stale_s`: the zone's or loop's stale_after_s, for inputs without their own.
  // `cfg` must outlive the registry: the slot and the topic index refer to it.
  std::size_t add(input_kind kind, const input_config& cfg, input_owner owner, double default_stale_s);
  std::size_t add(input_kind kind, const input_config&& cfg, input_owner owner, double default_stale_s) = delete;
  // Room for this many slots, so that adding them allocates once.
  void reserve(std::size_t slots) {
    slots_.reserve(slots);
    next_on_topic_.reserve(slots);
    by_topic_.reserve(slots);
  }

  // The slots reading `topic`, in the order they were added, into `ids` (cleared first);
  // false when no input uses it.
  bool slots_for(std::string_view topic, std::vector<std::size_t>& ids) const;
  [[nodiscard]] bool reads(std::string_view topic) const { return by_topic_.count(topic) != 0; }

  // One payload for one slot. `reading_ts` is the reading's own time, `now` the engine's.
  // True when the reading was accepted.
  bool apply(std::size_t id, std::string_view payload, timestamp reading_ts, timestamp now,
             const plausibility_config& plausibility, std::vector<input_transition>& changes);

  // Inputs that fell silent: ok/bad → stale, awaiting/bad → missing (`start`: the engine's).
  void check_staleness(timestamp start, timestamp now, std::vector<input_transition>& changes);

  // Takes over the readings and states of `previous` by (topic, field), for a reload.
  void adopt(const input_registry& previous);

  [[nodiscard]] const input_slot& operator[](std::size_t id) const { return slots_[id]; }
  [[nodiscard]] std::optional<double> fresh_value(std::size_t id, timestamp now) const {
    return slots_[id].fresh_value(now);
  }
  [[nodiscard]] std::vector<std::string> topics() const;  // sorted
  [[nodiscard]] const input_counts& counts() const { return counts_; }

 private:
  void note_bad(std::size_t id, input_fault fault, const std::string& reason, std::vector<input_transition>& changes);
  static void clear_fault(input_slot& s);

  std::vector<input_slot> slots_;
  // Topic -> the first and last slot reading it; next_on_topic_[slot] is the next slot of the
  // same topic (another field), k_no_next at the end. The key views the slot's own config
  // (cfg->topic), which outlives the registry as the slots' cfg pointers do: no second copy of
  // every topic and no vector per topic (at 10,000 zones 30,000 topics, about 2 MB with short
  // topics, more with real ones). A parallel array, not a slot field: the slot has no room
  // left in its 192 bytes.
  static constexpr std::uint32_t k_no_next = UINT32_MAX;
  std::vector<std::uint32_t> next_on_topic_;
  struct topic_chain {
    std::uint32_t first = 0;
    std::uint32_t last = 0;
  };
  std::unordered_map<std::string_view, topic_chain> by_topic_;
  input_counts counts_;
};

}  // namespace dewmargin
