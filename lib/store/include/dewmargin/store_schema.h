#pragma once
// Identity and version of the history database file.
//
// Tables (schema version 1):
//   events(id, ts_ms, subject_type, subject_id, kind, json)      — the event log, one row per
//        published event; indexed by (subject_id, ts_ms), (ts_ms) and (kind, ts_ms).
//   zone_samples(zone, minute_ms, min_margin_k, max_dew_point_c, worst_band, air_temp_c, rh_pct,
//        surface_min_c, supply_c), primary key (zone, minute_ms), indexed by minute_ms (retention).
//   zone_state(zone, band, alarm_active, acknowledged, shelved_until_ms, valve, ts_ms) and
//   loop_state(loop, setpoint_c, ts_ms)                          — latest snapshot, upserted.
// Times are integer milliseconds since the Unix epoch, UTC. Unknown values are NULL.
#include <cstdint>

namespace dewmargin {

// PRAGMA application_id of every dewmargin history file: ASCII "DwMg". A file with another id
// belongs to another program and is never touched.
inline constexpr std::int32_t k_store_application_id = 0x44774D67;

// PRAGMA user_version this program writes; it migrates older files and refuses newer ones.
inline constexpr int k_store_schema_version = 1;

}  // namespace dewmargin
