#include "dewmargin/engine.h"

#include "engine_state.h"

namespace dewmargin {

engine::state::state(site_config c) : cfg(std::move(c)), events(cfg.site, cfg.publish.prefix + "/events") {}

void engine::state::build() {
  // Memory per zone: the config's vectors lose their growth slack before the state points
  // into them, and the input slots are allocated once at their final size.
  cfg.zones.shrink_to_fit();
  cfg.loops.shrink_to_fit();
  cfg.dehumidifiers.shrink_to_fit();
  std::size_t slot_count = 3 * cfg.loops.size() + 2 * cfg.dehumidifiers.size();
  for (const auto& zc : cfg.zones) {
    slot_count += 1 + zc.humidity.size() + zc.surfaces.size() + (zc.condensation_switch ? 1 : 0) +
                  (zc.window_contact ? 1 : 0);
  }
  inputs.reserve(slot_count);
  cmd_prefix = cfg.publish.prefix + "/cmd/";
  std::unordered_map<std::string, std::size_t> loop_index;
  loops.reserve(cfg.loops.size());
  for (std::size_t i = 0; i < cfg.loops.size(); ++i) {
    const loop_config& lc = cfg.loops[i];
    loops.emplace_back(&lc, lc.setpoint.max_c);  // fail safe until readings say otherwise
    loop_rt& l = loops.back();
    const input_owner owner{true, i};
    l.supply_slot = inputs.add(input_kind::supply_temp, lc.supply_temp, owner, lc.stale_after_s);
    if (lc.return_temp) l.return_slot = inputs.add(input_kind::return_temp, *lc.return_temp, owner, lc.stale_after_s);
    if (lc.flow) l.flow_slot = inputs.add(input_kind::flow, *lc.flow, owner, lc.stale_after_s);
    loop_index[lc.id] = i;
  }
  zones.reserve(cfg.zones.size());
  for (std::size_t i = 0; i < cfg.zones.size(); ++i) build_zone(i, loop_index);
  units_of_zone.assign(zones.size(), {});
  for (std::size_t ui = 0; ui < cfg.dehumidifiers.size(); ++ui) {
    const dehumidifier_config& dc = cfg.dehumidifiers[ui];
    dehumidifier_rt d(&dc);
    for (const auto& zid : dc.zones) {
      const auto it = zone_index.find(zid);
      if (it == zone_index.end()) continue;
      d.zones.push_back(it->second);
      units_of_zone[it->second].push_back(ui);
    }
    input_owner owner;
    owner.is_dehumidifier = true;
    owner.index = ui;
    const double stale_s = cfg.defaults.stale_after_s;
    if (dc.fault) d.fault_slot = inputs.add(input_kind::unit_fault, *dc.fault, owner, stale_s);
    if (dc.supply_dew_point) {
      d.supply_dew_point_slot = inputs.add(input_kind::supply_dew_point, *dc.supply_dew_point, owner, stale_s);
    }
    dehumidifiers.push_back(std::move(d));
  }
}

void engine::state::build_zone(std::size_t i, const std::unordered_map<std::string, std::size_t>& loop_index) {
  const zone_config& zc = cfg.zones[i];
  const auto li = loop_index.find(zc.loop);
  // The loader rejects unknown loops; a programmatic config must not get this far.
  const std::size_t loop = li == loop_index.end() ? 0 : li->second;
  zones.emplace_back(&zc, loop);
  zone_rt& z = zones.back();
  const double stale_s = zc.thresholds.stale_after_s;
  const input_owner owner{false, i};
  z.air_slot = inputs.add(input_kind::air_temp, zc.air_temp, owner, stale_s);
  for (const auto& h : zc.humidity) z.humidity_slots.push_back(inputs.add(input_kind::humidity, h, owner, stale_s));
  for (const auto& s : zc.surfaces) z.surface_slots.push_back(inputs.add(input_kind::surface, s, owner, stale_s));
  if (zc.condensation_switch) {
    z.switch_slot = inputs.add(input_kind::condensation_switch, *zc.condensation_switch, owner, stale_s);
  }
  if (zc.window_contact) z.window_slot = inputs.add(input_kind::window_contact, *zc.window_contact, owner, stale_s);
  if (zc.valve) {
    const valve_config& v = *zc.valve;
    z.valve.emplace(valve_rules{v.reopen_after_s, v.close_ahead_min,
                                v.open_margin_k.value_or(zc.thresholds.margin_alarm_k), zc.thresholds.margin_alarm_k});
  }
  if (li != loop_index.end()) loops[loop].zones.push_back(i);
  zone_index[zc.id] = i;
}

timestamp engine::state::advance(timestamp now) {
  if (now < last_now) now = last_now;
  last_now = now;
  return now;
}

void engine::state::route(const std::string& topic, std::string_view payload, timestamp reading_ts, timestamp now,
                          engine_output& out, bool retained) {
  if (topic.compare(0, cmd_prefix.size(), cmd_prefix) == 0) {
    if (retained) {
      ++counters.retained_ignored;
      return;
    }
    on_command(topic, payload, now, out);
    return;
  }
  std::vector<std::size_t>& ids = route_ids;  // reused: no allocation per message
  if (!inputs.slots_for(topic, ids)) {
    ++counters.unrouted;
    return;
  }
  if (!retained) {
    on_reading(ids, payload, reading_ts, now, out);
    return;
  }
  // A retained switch state is the device's last word only until the service has heard from the
  // input: the broker re-sends retained messages at every resubscription (each reconnect), and an
  // old retained "dry" must never override a live "wet" heard since.
  std::vector<std::size_t> switches;
  for (std::size_t id : ids) {
    if (is_switch_kind(inputs[id].kind) && !inputs[id].last_message) switches.push_back(id);
  }
  if (switches.size() != ids.size()) ++counters.retained_ignored;
  if (!switches.empty()) on_reading(switches, payload, reading_ts, now, out);
}

void engine::state::tick(timestamp now, engine_output& out) {
  check_staleness(now, out);
  for (std::size_t zi = 0; zi < zones.size(); ++zi) {
    expire_shelving(zones[zi], now, out);
    evaluate_zone(zi, now, out);
  }
  tick_loops(now, out);
  tick_dehumidifiers(now, out);
}

engine::engine(site_config config) : s_(std::make_unique<state>(std::move(config))) { s_->build(); }
engine::~engine() = default;

void engine::begin(timestamp now, const restored_state& restored, engine_output& out) {
  s_->start = now;
  s_->last_now = now;
  s_->restore(restored, true, now);
  s_->publish_all(now, out);
}

void engine::adopt(const engine& previous, timestamp now, engine_output& out) {
  s_->adopt(*previous.s_);  // also the previous engine's start and last time
  s_->publish_all(s_->advance(now), out);
}

void engine::republish(timestamp now, engine_output& out) { s_->republish(s_->advance(now), out); }

void engine::on_message(const std::string& topic, std::string_view payload, timestamp now, engine_output& out,
                        bool retained) {
  ++s_->counters.messages;
  const timestamp reading_ts = now;
  s_->route(topic, payload, reading_ts, s_->advance(now), out, retained);
}

void engine::tick(timestamp now, engine_output& out) { s_->tick(s_->advance(now), out); }

void engine::flush(timestamp now, engine_output& out) { s_->flush(s_->advance(now), out); }

bool engine::reads(const std::string& topic) const { return s_->inputs.reads(topic); }

std::vector<std::string> engine::subscriptions() const {
  std::vector<std::string> topics = s_->inputs.topics();
  topics.push_back(s_->cmd_prefix + "#");
  topics.shrink_to_fit();  // the link keeps the list: not twice its size (1 MB at 10,000 zones)
  return topics;
}

const site_config& engine::config() const { return s_->cfg; }

engine_counters engine::counters() const {
  engine_counters c = s_->counters;
  const input_counts& in = s_->inputs.counts();
  c.readings = in.readings;
  c.bad_readings = in.bad_readings;
  c.suppressed_input_events = in.suppressed_transitions;
  return c;
}

restored_state engine::snapshot() const {
  restored_state r;
  for (const zone_rt& z : s_->zones) r.zones.push_back(state::snapshot_of(z, s_->last_now));
  for (const loop_rt& l : s_->loops) r.loops.push_back({l.cfg->id, l.reset.setpoint_c(), s_->last_now});
  return r;
}

std::string engine::status_topic() const { return s_->cfg.publish.prefix + "/status"; }
std::string engine::events_topic() const { return s_->events.topic(); }
std::string engine::command_prefix() const { return s_->cmd_prefix; }

void engine::service_event(timestamp now, const std::string& from, const std::string& to, const std::string& reason,
                           engine_output& out) const {
  s_->events.emit(out, now, {subject_type::site, ""}, event_kind::service,
                  [&](event_json& e) { e.text_or_null("from", from).text("to", to).text("reason", reason); });
}

}  // namespace dewmargin
