#pragma once
// The engine's state, shared by the files that implement it (private to lib/core):
//   engine.cpp                 construction, routing of messages, the tick
//   engine_inputs.cpp          readings into the input registry, `input` events
//   engine_zones.cpp           zone evaluation: margin, band and alarm, valve; zone state
//   engine_loops.cpp           loop setpoints, loop state, dehumidifier requests
//   engine_commands.cpp        operator commands
//   engine_state_transfer.cpp  snapshot, restore (restart) and adopt (reload), in one place
#include <optional>
#include <string>
#include <unordered_map>
#include <vector>

#include "dewmargin/change_gate.h"
#include "dewmargin/command_guard.h"
#include "dewmargin/dehumidifier_fault.h"
#include "dewmargin/dehumidifier_request.h"
#include "dewmargin/engine.h"
#include "dewmargin/event_emitter.h"
#include "dewmargin/input_registry.h"
#include "dewmargin/loop_reset_driver.h"
#include "dewmargin/margin_trend.h"
#include "dewmargin/minute_sample.h"
#include "dewmargin/operator_command.h"
#include "dewmargin/supply_reset.h"
#include "dewmargin/zone_steps.h"

namespace dewmargin {

struct zone_rt {
  zone_rt(const zone_config* c, std::size_t loop_index)
      : cfg(c), loop(loop_index), condition(c->thresholds), trend(c->thresholds.trend_window_s) {}

  const zone_config* cfg;
  std::size_t loop;
  std::size_t air_slot = 0;
  std::vector<std::size_t> humidity_slots;
  std::vector<std::size_t> surface_slots;
  std::optional<std::size_t> switch_slot;
  std::optional<std::size_t> window_slot;

  // What carries over a reload (engine_state_transfer.cpp).
  zone_condition condition;
  std::optional<zone_valve> valve;
  minute_sampler sample;
  // A restored active alarm is not cleared by the supply fallback: until one of the zone's
  // surfaces has reported since start, the zone is judged on its surfaces only.
  bool hold_restored_alarm = false;

  margin_trend trend;
  zone_margin margin;  // last evaluation

  // Last publication.
  change_gate<7> gate;
  band published_band = band::unknown;
  alarm_status published_alarm;
  valve_position published_valve = valve_position::unset;
  std::string published_hold;
  std::string suppressed_by;  // the unit whose fault suppresses this zone's tight/alarm, or ""
  std::string published_suppressed_by;
  std::string published_source;             // margin_source, "" for null
  std::optional<double> published_minutes;  // minutes_to_condensation as published
  bool published = false;

  // A zone held by the start-up permissive counts: its dew point must raise the water.
  [[nodiscard]] bool counts_for_reset() const { return !valve || valve->counts_as_open() || valve->held(); }
  [[nodiscard]] bool valve_held() const { return valve && valve->held(); }
  [[nodiscard]] event_subject subject() const { return {subject_type::zone, cfg->id}; }
};

struct loop_rt {
  loop_rt(const loop_config* c, double initial_c)
      : cfg(c), reset(c->setpoint, initial_c), last_event_setpoint_c(initial_c) {}

  const loop_config* cfg;
  std::size_t supply_slot = 0;
  std::optional<std::size_t> return_slot;
  std::optional<std::size_t> flow_slot;
  supply_reset reset;
  std::vector<std::size_t> zones;
  std::optional<double> cooling_kw;

  double last_event_setpoint_c;
  setpoint_limit last_event_limit = setpoint_limit::max;
  std::string last_event_governing;
  // A limit or governing zone that differs from the last event's, and since when.
  std::optional<timestamp> change_since;
  setpoint_limit pending_limit = setpoint_limit::none;
  std::string pending_governing;
  change_gate<5> gate;
  double published_setpoint_c = 0.0;
  setpoint_limit published_limit = setpoint_limit::none;
  std::string published_bare;  // last bare setpoint sent to the plant
  bool published = false;

  [[nodiscard]] event_subject subject() const { return {subject_type::loop, cfg->id}; }
};

struct dehumidifier_rt {
  explicit dehumidifier_rt(const dehumidifier_config* c) : cfg(c), fault(c->fault_k, c->fault_after_s) {}

  const dehumidifier_config* cfg;
  std::vector<std::size_t> zones;
  std::optional<double> published_request_c;  // what the plant was last told
  dehumidifier_trim trim{};
  std::optional<std::size_t> fault_slot;
  std::optional<std::size_t> supply_dew_point_slot;
  dehumidifier_fault fault;
  zone_alarm alarm;  // the unit's own alarm (ISA-18.2 states as a zone's)
  bool published = false;
  std::optional<double> published_supply_dew_point_c;

  [[nodiscard]] event_subject subject() const { return {subject_type::dehumidifier, cfg->id}; }
};

struct engine::state {
  explicit state(site_config c);

  site_config cfg;
  input_registry inputs;
  std::vector<zone_rt> zones;
  std::vector<loop_rt> loops;
  std::vector<dehumidifier_rt> dehumidifiers;
  std::vector<std::vector<std::size_t>> units_of_zone;  // zone index -> its dehumidifiers
  std::unordered_map<std::string, std::size_t> zone_index;
  std::string cmd_prefix;
  event_emitter events;
  timestamp start{};
  timestamp last_now{};
  engine_counters counters;
  command_guard commands;

  // engine.cpp
  void build();
  void build_zone(std::size_t i, const std::unordered_map<std::string, std::size_t>& loop_index);
  timestamp advance(timestamp now);
  void route(const std::string& topic, std::string_view payload, timestamp reading_ts, timestamp now,
             engine_output& out, bool retained);
  void tick(timestamp now, engine_output& out);

  // engine_inputs.cpp
  void on_reading(const std::vector<std::size_t>& ids, std::string_view payload, timestamp reading_ts, timestamp now,
                  engine_output& out);
  void emit_input_changes(const std::vector<input_transition>& changes, timestamp now, engine_output& out);
  void check_staleness(timestamp now, engine_output& out);

  // engine_zones.cpp
  const zone_readings& readings_of(const zone_rt& z, timestamp now);
  zone_readings scratch_readings;      // readings_of() fills it; read before the next call
  std::vector<std::size_t> route_ids;  // route(): the slots of the message's topic
  void evaluate_zone(std::size_t zi, timestamp now, engine_output& out);
  void emit_band_event(const zone_rt& z, const band_step& step, bool switch_active, timestamp now, engine_output& out);
  bool move_valve(zone_rt& z, band b, timestamp now, engine_output& out);
  void expire_shelving(zone_rt& z, timestamp now, engine_output& out);
  void publish_zone(zone_rt& z, timestamp now, engine_output& out, bool force);
  void publish_valve(const zone_rt& z, valve_position p, engine_output& out) const;

  // engine_loops.cpp
  // Fills the engine's one scratch vector (every loop, every tick: no allocation each time).
  const std::vector<zone_demand>& demands_of(const loop_rt& l);
  std::vector<zone_demand> scratch_demands;
  void tick_loops(timestamp now, engine_output& out);
  void loop_outputs(loop_rt& l, timestamp now, engine_output& out);
  void publish_loop(loop_rt& l, timestamp now, engine_output& out, bool force);
  void update_cooling(loop_rt& l, timestamp now);
  void tick_dehumidifiers(timestamp now, engine_output& out);
  void judge_unit_fault(dehumidifier_rt& d, timestamp now, engine_output& out);
  void publish_dehumidifier(dehumidifier_rt& d, timestamp now, engine_output& out, bool force);
  void publish_request(const dehumidifier_rt& d, double request_c, engine_output& out) const;
  // The dehumidifier whose standing alarm suppresses this zone's tight/alarm annunciation.
  const std::string* suppressor_of(std::size_t zi) const;

  // engine_commands.cpp
  void on_command(const std::string& topic, std::string_view payload, timestamp now, engine_output& out);
  void emit_command_event(const event_subject& subject, const alarm_status& after, const operator_command& c,
                          const alarm_status& before, timestamp now, engine_output& out);
  void on_unit_command(dehumidifier_rt& d, const std::string& topic, const std::string& verb, const operator_command& c,
                       timestamp now, engine_output& out);
  void reject(const std::string& topic, const std::string& verb, const std::string& zone, rejection_kind kind,
              const std::string& reason, timestamp now, engine_output& out);
  void emit_rejected(const std::string& topic, const std::string& verb, const std::string& zone,
                     const std::string& reason, timestamp now, engine_output& out);

  // engine_state_transfer.cpp
  static zone_snapshot snapshot_of(const zone_rt& z, timestamp now);
  void emit_zone_snapshot(engine_output& out, const zone_rt& z, timestamp now) const;
  void restore(const restored_state& r, bool from_storage, timestamp now);
  void restore_setpoint(const std::string& loop, double setpoint_c);
  void adopt(const state& previous);
  void publish_all(timestamp now, engine_output& out);
  void republish(timestamp now, engine_output& out);
  void flush(timestamp now, engine_output& out);
};

}  // namespace dewmargin
