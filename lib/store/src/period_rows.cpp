#include "period_rows.h"

namespace dewmargin::store_detail {
namespace {

std::optional<double> optional_double(sqlite3_stmt* stmt, int column) {
  if (sqlite3_column_type(stmt, column) == SQLITE_NULL) return std::nullopt;
  return sqlite3_column_double(stmt, column);
}

std::int32_t int32_column(sqlite3_stmt* stmt, int column) {
  return static_cast<std::int32_t>(sqlite3_column_int64(stmt, column));
}

// A stored mean counts for the hour's sample minutes (the per-column count is not stored).
minute_mean mean_column(sqlite3_stmt* stmt, int column, std::int32_t minutes) {
  const auto v = optional_double(stmt, column);
  return v ? minute_mean{*v, minutes} : minute_mean{};
}

void assign_text(std::string& out, sqlite3_stmt* stmt, int column) {
  const unsigned char* text = sqlite3_column_text(stmt, column);
  if (text == nullptr) {
    out.clear();
    return;
  }
  out.assign(reinterpret_cast<const char*>(text), static_cast<std::size_t>(sqlite3_column_bytes(stmt, column)));
}

}  // namespace

std::string minute_columns(int schema_version) {
  return std::string(
             "minute_ms, zone, min_margin_k, max_dew_point_c, worst_band, air_temp_c, rh_pct, surface_min_c, "
             "supply_c, ") +
         (schema_version >= 2 ? "surface_rh_pct" : "NULL");
}

void read_minute_row(sqlite3_stmt* stmt, zone_sample& s, zone_period& out) {
  s.minute_start = from_unix_ms(sqlite3_column_int64(stmt, 0));
  assign_text(s.zone, stmt, 1);
  s.min_margin_k = optional_double(stmt, 2);
  s.max_dew_point_c = optional_double(stmt, 3);
  assign_text(s.worst_band, stmt, 4);
  s.air_temp_c = optional_double(stmt, 5);
  s.rh_pct = optional_double(stmt, 6);
  s.surface_min_c = optional_double(stmt, 7);
  s.supply_c = optional_double(stmt, 8);
  s.surface_rh_pct = optional_double(stmt, 9);
  assign_period_of(s, out);
}

void read_hour_row(sqlite3_stmt* stmt, zone_period& out) {
  out.start = from_unix_ms(sqlite3_column_int64(stmt, 0));
  assign_text(out.zone, stmt, 1);
  out.length_min = 60;
  const std::int32_t minutes = int32_column(stmt, 2);
  out.sample_minutes = minutes;
  out.min_margin_k = optional_double(stmt, 3);
  out.min_margin_at =
      sqlite3_column_type(stmt, 4) == SQLITE_NULL ? out.start : from_unix_ms(sqlite3_column_int64(stmt, 4));
  out.max_margin_k = optional_double(stmt, 5);
  out.mean_margin_k = mean_column(stmt, 6, minutes);
  out.max_dew_point_c = optional_double(stmt, 7);
  out.mean_dew_point_c = mean_column(stmt, 8, minutes);
  out.min_surface_c = optional_double(stmt, 9);
  out.mean_surface_c = mean_column(stmt, 10, minutes);
  out.mean_air_temp_c = mean_column(stmt, 11, minutes);
  out.mean_rh_pct = mean_column(stmt, 12, minutes);
  out.mean_supply_c = mean_column(stmt, 13, minutes);
  out.max_surface_rh_pct = optional_double(stmt, 14);
  out.mean_surface_rh_pct = mean_column(stmt, 15, minutes);
  for (int b = 0; b < k_band_count; ++b) out.band_minutes[static_cast<std::size_t>(b)] = int32_column(stmt, 16 + b);
  out.mould_minutes = int32_column(stmt, 21);
  out.mould_head_min = int32_column(stmt, 22);
  out.mould_tail_min = int32_column(stmt, 23);
  out.mould_longest_min = int32_column(stmt, 24);
}

std::string upsert_hour_sql() {
  std::string sql = std::string("INSERT OR REPLACE INTO zone_hours (") + k_hour_columns + ") VALUES (";
  for (int i = 1; i <= k_hour_column_count; ++i) sql += (i > 1 ? ", ?" : "?") + std::to_string(i);
  return sql + ")";
}

int write_hour_row(const statement& stmt, const zone_period& h) {
  const auto& b = h.band_minutes;
  return stmt.run(to_unix_ms(h.start), h.zone, h.sample_minutes, h.min_margin_k,
                  h.min_margin_k ? std::optional<std::int64_t>(to_unix_ms(h.min_margin_at)) : std::nullopt,
                  h.max_margin_k, h.mean_margin_k.value(), h.max_dew_point_c, h.mean_dew_point_c.value(),
                  h.min_surface_c, h.mean_surface_c.value(), h.mean_air_temp_c.value(), h.mean_rh_pct.value(),
                  h.mean_supply_c.value(), h.max_surface_rh_pct, h.mean_surface_rh_pct.value(), b[0], b[1], b[2], b[3],
                  b[4], h.mould_minutes, h.mould_head_min, h.mould_tail_min, h.mould_longest_min);
}

}  // namespace dewmargin::store_detail
