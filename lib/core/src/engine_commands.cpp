// Operator commands: limits (command_guard.h), parsing (operator_command.h), and their
// effect on a zone's alarm.
#include <cstdio>

#include "engine_state.h"

namespace dewmargin {

void engine::state::on_command(const std::string& topic, std::string_view payload, timestamp now, engine_output& out) {
  const std::string verb = topic.substr(cmd_prefix.size());
  if (!commands.admit(now)) {
    ++counters.rate_limited;
    if (commands.report_rate_limit(now)) {
      char reason[96];
      std::snprintf(reason, sizeof reason, "too many commands: more than %.0f a second (bursts of %.0f)",
                    k_command_rate_per_s, k_command_burst);
      emit_rejected(topic, verb, "", reason, now, out);
    }
    return;
  }
  std::string zone_named;
  auto parsed = parse_operator_command(verb, payload, zone_named);
  if (!parsed) {
    const rejection_kind kind = payload.size() > k_max_command_bytes ? rejection_kind::too_large
                                : !parse_command_verb(verb)          ? rejection_kind::unknown_command
                                                                     : rejection_kind::malformed;
    return reject(topic, verb, zone_named, kind, parsed.err().message, now, out);
  }
  const operator_command& c = parsed.value();
  const auto it = zone_index.find(c.zone);
  if (it == zone_index.end()) {
    // A dehumidifier's own alarm is acknowledged and shelved like a zone's, by its id.
    for (dehumidifier_rt& d : dehumidifiers) {
      if (d.cfg->id == c.zone && (d.fault_slot || d.supply_dew_point_slot)) {
        return on_unit_command(d, topic, verb, c, now, out);
      }
    }
    return reject(topic, verb, c.zone, rejection_kind::unknown_zone, "unknown zone '" + c.zone + "'", now, out);
  }
  zone_rt& z = zones[it->second];
  const alarm_status before = z.condition.alarm.status();
  std::string why;
  switch (c.verb) {
    case command_verb::ack:
      why = z.condition.alarm.acknowledge();
      break;
    case command_verb::shelve:
      why = z.condition.alarm.shelve(c.minutes, now);
      break;
    case command_verb::unshelve:
      why = z.condition.alarm.unshelve();
      break;
  }
  if (!why.empty()) return reject(topic, verb, c.zone, rejection_kind::refused, why, now, out);
  ++counters.commands;
  emit_command_event(z.subject(), z.condition.alarm.status(), c, before, now, out);
  emit_zone_snapshot(out, z, now);
  publish_zone(z, now, out, false);
}

void engine::state::on_unit_command(dehumidifier_rt& d, const std::string& topic, const std::string& verb,
                                    const operator_command& c, timestamp now, engine_output& out) {
  const alarm_status before = d.alarm.status();
  std::string why;
  switch (c.verb) {
    case command_verb::ack:
      why = d.alarm.acknowledge();
      break;
    case command_verb::shelve:
      why = d.alarm.shelve(c.minutes, now);
      break;
    case command_verb::unshelve:
      why = d.alarm.unshelve();
      break;
  }
  if (!why.empty()) return reject(topic, verb, c.zone, rejection_kind::refused, why, now, out);
  ++counters.commands;
  emit_command_event(d.subject(), d.alarm.status(), c, before, now, out);
  publish_dehumidifier(d, now, out, true);
}

void engine::state::emit_command_event(const event_subject& subject, const alarm_status& after,
                                       const operator_command& c, const alarm_status& before, timestamp now,
                                       engine_output& out) {
  const event_kind kind = c.verb == command_verb::ack      ? event_kind::ack
                          : c.verb == command_verb::shelve ? event_kind::shelve
                                                           : event_kind::unshelve;
  events.emit(
      out, now, subject, kind,
      [&](event_json& e) {
        switch (c.verb) {
          case command_verb::ack:
            // ISA-18.2: an alarm that cleared while unacknowledged is latched (return to normal, unacknowledged).
            e.text("from", before.active ? "unacknowledged" : "latched").text("to", "acknowledged").text("by", c.by);
            e.text_or_null("note", c.note);
            break;
          case command_verb::shelve:
            e.text("from", before.shelved_until ? "shelved" : "unshelved").text("to", "shelved").text("by", c.by);
            e.integer("minutes", c.minutes).text("until", format_iso8601_utc(*after.shelved_until));
            e.text_or_null("reason", c.reason);
            break;
          case command_verb::unshelve:
            e.text("from", "shelved").text("to", "unshelved").text("by", c.by).text_or_null("reason", c.reason);
            break;
        }
        e.alarm(after);
      },
      true);
}

void engine::state::reject(const std::string& topic, const std::string& verb, const std::string& zone,
                           rejection_kind kind, const std::string& reason, timestamp now, engine_output& out) {
  ++counters.rejected;
  if (!commands.report_rejection(topic, kind, reason, now)) {
    ++counters.suppressed_rejections;
    return;
  }
  emit_rejected(topic, verb, zone, reason, now, out);
}

void engine::state::emit_rejected(const std::string& topic, const std::string& verb, const std::string& zone,
                                  const std::string& reason, timestamp now, engine_output& out) {
  const bool known = zone_index.count(zone) > 0;
  const event_subject subject = known ? event_subject{subject_type::zone, zone} : event_subject{};
  events.emit(out, now, subject, event_kind::rejected, [&](event_json& e) {
    if (!known && !zone.empty()) e.text("zone", zone);
    e.text("topic", topic).text("command", verb).text("reason", reason);
  });
}

}  // namespace dewmargin
