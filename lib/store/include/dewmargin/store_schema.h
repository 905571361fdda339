#pragma once
// Identity and version of the history database file.
//
// Tables (schema version 3):
//   events(id, ts_ms, subject_type, subject_id, kind, json)      — the event log, one row per
//        published event; indexed by (subject_id, ts_ms), (ts_ms) and (kind, ts_ms).
//   zone_samples(minute_ms, zone, min_margin_k, max_dew_point_c, worst_band, air_temp_c, rh_pct,
//        surface_min_c, supply_c, surface_rh_pct), primary key (minute_ms, zone), WITHOUT ROWID
//        (clustered by time). Version 1 had (zone, minute_ms) and no surface_rh_pct.
//   zone_hours(hour_ms, zone, sample_minutes, min/max/mean margin, min_margin_at_ms, dew point,
//        surface, air, RH, supply, surface RH, minutes per band, mould minutes and runs), primary
//        key (hour_ms, zone), WITHOUT ROWID: one row per zone and hour, written as each hour
//        completes (version 3; version 2 wrote them only when rolling up old samples).
//   store_marks(name, value_ms) (version 3): 'hours_until' — every hour before it has its
//        zone_hours rows, later minutes are only in zone_samples; 'minutes_from' — the per-minute
//        samples before it were deleted by the roll-up (older than keep_minute_samples_days).
//   zone_state(zone, band, alarm_active, acknowledged, shelved_until_ms, valve, ts_ms) and
//   loop_state(loop, setpoint_c, ts_ms)                          — latest snapshot, upserted.
// Times are integer milliseconds since the Unix epoch, UTC. Unknown values are NULL.
#include <cstdint>

namespace dewmargin {

// PRAGMA application_id of every dewmargin history file: ASCII "DwMg". A file with another id
// belongs to another program and is never touched.
inline constexpr std::int32_t k_store_application_id = 0x44774D67;

// PRAGMA user_version this program writes; it migrates older files and refuses newer ones.
inline constexpr int k_store_schema_version = 3;

// The oldest version a read-only reader accepts (it cannot migrate): version 1 files are read
// as they are, without surface RH columns or hourly roll-ups; version 2 without marks (its hours
// and minutes never overlap).
inline constexpr int k_store_min_readable_version = 1;

}  // namespace dewmargin
