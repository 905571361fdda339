// Readings into the input registry, and the `input` events of its transitions.
#include "engine_state.h"

namespace dewmargin {

void engine::state::on_reading(const std::vector<std::size_t>& ids, std::string_view payload, timestamp reading_ts,
                               timestamp now, engine_output& out) {
  std::vector<input_transition> changes;
  for (std::size_t id : ids) {
    changes.clear();
    inputs.apply(id, payload, reading_ts, now, cfg.plausibility, changes);
    emit_input_changes(changes, now, out);
    const input_slot& s = inputs[id];
    if (s.owner.is_dehumidifier) continue;  // judged on the tick
    if (!s.owner.is_loop) {
      evaluate_zone(s.owner.index, now, out);
      continue;
    }
    loop_rt& l = loops[s.owner.index];
    if (s.kind == input_kind::supply_temp) {
      // Zones without a fresh surface use the supply temperature as their reference.
      for (std::size_t zi : l.zones) {
        if (!zones[zi].margin.surface_min_c) evaluate_zone(zi, now, out);
      }
    }
    update_cooling(l, now);
    publish_loop(l, now, out, false);
  }
}

void engine::state::check_staleness(timestamp now, engine_output& out) {
  std::vector<input_transition> changes;
  inputs.check_staleness(start, now, changes);
  emit_input_changes(changes, now, out);
}

void engine::state::emit_input_changes(const std::vector<input_transition>& changes, timestamp now,
                                       engine_output& out) {
  for (const input_transition& t : changes) {
    const input_slot& s = inputs[t.slot];
    const event_subject subject = s.owner.is_dehumidifier ? dehumidifiers[s.owner.index].subject()
                                  : s.owner.is_loop       ? loops[s.owner.index].subject()
                                                          : zones[s.owner.index].subject();
    events.emit(out, now, subject, event_kind::input, [&](event_json& e) {
      e.text("from", input_status_name(t.from)).text("to", input_status_name(t.to)).text("topic", s.cfg->topic);
      if (!s.cfg->field.empty()) e.text("field", s.cfg->field);
      e.text("input", input_kind_name(s.kind)).text("reason", t.reason);
      if (t.fault) e.text("fault", input_fault_name(*t.fault));
      if (t.bad_messages) e.integer("bad_messages", static_cast<long long>(*t.bad_messages));
    });
  }
}

}  // namespace dewmargin
