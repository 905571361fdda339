#pragma once
// Internal: reading per-minute samples and hourly roll-ups as zone_period rows, and writing
// roll-ups. Shared by the writer (roll-up) and the reader (reports), so both read a row alike.
#include <cstdint>
#include <string>

#include "dewmargin/zone_period.h"
#include "sqlite_handle.h"

namespace dewmargin::store_detail {

inline constexpr std::int64_t k_ms_per_minute = 60'000;
inline constexpr std::int64_t k_ms_per_hour = 3'600'000;

// Columns of a per-minute sample, in the order minute_period_of() reads them. Version 1 files
// have no surface_rh_pct column: `NULL` stands in.
std::string minute_columns(int schema_version);
inline constexpr const char* k_hour_columns =
    "hour_ms, zone, sample_minutes, min_margin_k, min_margin_at_ms, max_margin_k, mean_margin_k, max_dew_point_c, "
    "mean_dew_point_c, min_surface_c, mean_surface_c, mean_air_temp_c, mean_rh_pct, mean_supply_c, "
    "max_surface_rh_pct, mean_surface_rh_pct, safe_min, tight_min, alarm_min, condensing_min, unknown_min, mould_min, "
    "mould_head_min, mould_tail_min, mould_longest_min";
inline constexpr int k_hour_column_count = 25;

// Reads the current row of a statement selecting minute_columns() / k_hour_columns into `out`
// (reusing its string's capacity: no allocation per row once warm).
void read_minute_row(sqlite3_stmt* stmt, zone_sample& scratch, zone_period& out);
void read_hour_row(sqlite3_stmt* stmt, zone_period& out);

// "INSERT OR REPLACE INTO zone_hours (k_hour_columns) VALUES (?1 … ?25)".
std::string upsert_hour_sql();
// Binds an hour row and runs the statement; returns SQLite's code (SQLITE_DONE on success).
int write_hour_row(const statement& stmt, const zone_period& hour);

}  // namespace dewmargin::store_detail
