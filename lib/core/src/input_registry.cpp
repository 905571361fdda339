#include "dewmargin/input_registry.h"

#include <algorithm>
#include <cstdio>

namespace dewmargin {
namespace {

std::string format_seconds(double s) {
  char buf[48];
  std::snprintf(buf, sizeof buf, "%.0f s", s);
  return buf;
}

// Why a payload is no good reading, or nothing when it is one (value or state set).
struct decoded {
  std::optional<error> problem;
  std::optional<input_fault> fault;  // set where the stage alone names it
  double value = 0.0;
  bool active = false;
};

decoded decode(const input_slot& s, std::string_view payload, timestamp reading_ts,
               const plausibility_config& plausibility) {
  decoded d;
  if (payload.size() > k_max_input_payload_bytes) {
    d.fault = input_fault::too_large;
    d.problem = make_error(error_code::out_of_range, "payload too large (" + std::to_string(payload.size()) +
                                                         " bytes, at most " +
                                                         std::to_string(k_max_input_payload_bytes) + "), not read");
  } else if (s.last_reading && reading_ts < *s.last_reading) {
    d.fault = input_fault::out_of_order;
    d.problem =
        make_error(error_code::out_of_range, "reading older than the last one (" + format_iso8601_utc(reading_ts) +
                                                 " < " + format_iso8601_utc(*s.last_reading) + ")");
  } else if (is_switch_kind(s.kind)) {
    auto r = decode_switch(payload, *s.cfg);
    if (r)
      d.active = r.value();
    else
      d.problem = r.err();
  } else if (auto r = decode_number(payload, *s.cfg, s.kind); !r) {
    d.problem = r.err();
  } else if (auto p = check_plausible(r.value(), s.kind, plausibility); !p) {
    d.fault = input_fault::out_of_range;
    d.problem = p.err();
  } else {
    d.value = p.value();
  }
  return d;
}

}  // namespace

const char* input_status_name(input_status s) {
  switch (s) {
    case input_status::awaiting:
      return "awaiting";
    case input_status::ok:
      return "ok";
    case input_status::bad:
      return "bad";
    case input_status::stale:
      return "stale";
    case input_status::missing:
      return "missing";
  }
  return "ok";
}

bool input_slot::fresh(timestamp now) const {
  if (!last_reading) return false;
  if (stale_after_s <= 0.0) return true;
  return seconds_between(*last_reading, now) < stale_after_s;
}

std::optional<double> input_slot::fresh_value(timestamp now) const {
  if (value && fresh(now)) return value;
  return std::nullopt;
}

std::size_t input_registry::add(input_kind kind, const input_config& cfg, input_owner owner, double default_stale_s) {
  input_slot s;
  s.kind = kind;
  s.cfg = &cfg;
  s.owner = owner;
  s.stale_after_s = cfg.stale_after_s.value_or(is_switch_kind(kind) ? 0.0 : default_stale_s);
  // A never-stale input still cannot keep its zone waiting for ever (nor can a zone whose
  // stale_after_s is 0: then the default limit applies to the wait).
  s.grace_s = s.stale_after_s > 0.0 ? s.stale_after_s
                                    : (default_stale_s > 0.0 ? default_stale_s : band_thresholds{}.stale_after_s);
  slots_.push_back(std::move(s));
  const std::size_t id = slots_.size() - 1;
  const auto id32 = static_cast<std::uint32_t>(id);
  next_on_topic_.push_back(k_no_next);
  const auto [it, first] = by_topic_.try_emplace(std::string_view(cfg.topic), topic_chain{id32, id32});
  if (!first) {
    next_on_topic_[it->second.last] = id32;
    it->second.last = id32;
  }
  return id;
}

bool input_registry::slots_for(std::string_view topic, std::vector<std::size_t>& ids) const {
  ids.clear();
  const auto it = by_topic_.find(topic);
  if (it == by_topic_.end()) return false;
  for (std::uint32_t id = it->second.first; id != k_no_next; id = next_on_topic_[id]) {
    ids.push_back(id);
  }
  return true;
}

bool input_registry::apply(std::size_t id, std::string_view payload, timestamp reading_ts, timestamp now,
                           const plausibility_config& plausibility, std::vector<input_transition>& changes) {
  input_slot& s = slots_[id];
  s.last_message = now;
  const decoded d = decode(s, payload, reading_ts, plausibility);
  if (d.problem) {
    note_bad(id, d.fault.value_or(classify_decode_error(*d.problem)), d.problem->message, changes);
    return false;
  }
  ++counts_.readings;
  if (is_switch_kind(s.kind)) {
    s.active = d.active;
    s.last_switch_payload.assign(payload.data(), payload.size());
  } else {
    s.value = d.value;
  }
  s.last_reading = reading_ts;
  if (s.status != input_status::ok && s.status != input_status::awaiting) {
    input_transition t{id, s.status, input_status::ok, "reading accepted again", std::nullopt, std::nullopt};
    if (s.status == input_status::bad) t.bad_messages = s.bad_messages;
    changes.push_back(std::move(t));
  }
  s.status = input_status::ok;
  clear_fault(s);
  return true;
}

// One transition when the input turns bad and one for each further kind of fault while it
// stays bad (two bad payloads taking turns are two, not one per message); the rest counted.
void input_registry::note_bad(std::size_t id, input_fault fault, const std::string& reason,
                              std::vector<input_transition>& changes) {
  input_slot& s = slots_[id];
  ++counts_.bad_readings;
  if (s.status != input_status::bad) clear_fault(s);
  ++s.bad_messages;
  const unsigned bit = 1U << static_cast<unsigned>(fault);
  if (s.faults_reported & bit) {
    ++counts_.suppressed_transitions;
    return;
  }
  s.faults_reported |= bit;
  changes.push_back({id, s.status, input_status::bad, reason, fault, std::nullopt});
  s.status = input_status::bad;
  s.fault = fault;
  s.bad_reason = reason;
}

void input_registry::check_staleness(timestamp start, timestamp now, std::vector<input_transition>& changes) {
  const double since_start_s = seconds_between(start, now);
  for (std::size_t id = 0; id < slots_.size(); ++id) {
    input_slot& s = slots_[id];
    // A never-stale measurement that has not reported once in its zone's wait after start is
    // missing: otherwise a zone could stay unknown for ever with no alarm.
    const bool never_stale_measurement = s.stale_after_s <= 0.0 && !is_switch_kind(s.kind);
    if (never_stale_measurement && s.status == input_status::awaiting && since_start_s >= s.grace_s) {
      changes.push_back({id, s.status, input_status::missing,
                         "no reading in the " + format_seconds(s.grace_s) + " since start", std::nullopt,
                         std::nullopt});
      s.status = input_status::missing;
      continue;
    }
    if (s.stale_after_s <= 0.0 || s.fresh(now)) continue;
    // An input that keeps sending bad payloads is bad, not silent.
    const bool still_talking = s.last_message && seconds_between(*s.last_message, now) < s.stale_after_s;
    if (s.status == input_status::bad && still_talking) continue;
    input_transition t{id, s.status, input_status::stale, "", std::nullopt, std::nullopt};
    if (s.last_reading) {
      if (s.status == input_status::stale) continue;
      t.reason = "no reading for " + format_seconds(s.stale_after_s);
    } else if (since_start_s >= s.stale_after_s && s.status != input_status::missing) {
      t.to = input_status::missing;
      t.reason = "no reading in the " + format_seconds(s.stale_after_s) + " since start";
    } else {
      continue;
    }
    if (s.status == input_status::bad) t.bad_messages = s.bad_messages;
    s.status = t.to;
    clear_fault(s);
    changes.push_back(std::move(t));
  }
}

void input_registry::adopt(const input_registry& previous) {
  std::vector<std::size_t> old_ids;
  for (input_slot& s : slots_) {
    if (!previous.slots_for(s.cfg->topic, old_ids)) continue;
    for (std::size_t id : old_ids) {
      const input_slot& old = previous.slots_[id];
      if (old.cfg->field != s.cfg->field || is_switch_kind(old.kind) != is_switch_kind(s.kind)) continue;
      s.value = old.value;
      s.active = old.active;
      s.last_reading = old.last_reading;
      s.last_message = old.last_message;
      s.status = old.status;
      s.fault = old.fault;
      s.bad_reason = old.bad_reason;
      s.bad_messages = old.bad_messages;
      s.faults_reported = old.faults_reported;
      s.last_switch_payload = old.last_switch_payload;
      const bool words_changed = old.cfg->active != s.cfg->active || old.cfg->inactive != s.cfg->inactive;
      if (is_switch_kind(s.kind) && words_changed && s.last_reading) {
        // The state was decoded with the old words: decode its payload again with the new ones.
        // A payload the new words do not know makes the input bad, its last state kept.
        const auto again = decode_switch(s.last_switch_payload, *s.cfg);
        if (again) {
          s.active = again.value();
        } else {
          s.status = input_status::bad;
          s.fault = input_fault::unknown_word;
          s.bad_reason = again.err().message;
        }
      }
    }
  }
}

std::vector<std::string> input_registry::topics() const {
  std::vector<std::string> topics;
  topics.reserve(by_topic_.size());
  for (const auto& kv : by_topic_) topics.emplace_back(kv.first);
  std::sort(topics.begin(), topics.end());
  return topics;
}

void input_registry::clear_fault(input_slot& s) {
  s.fault.reset();
  s.bad_reason.clear();
  s.bad_messages = 0;
  s.faults_reported = 0;
}

}  // namespace dewmargin
