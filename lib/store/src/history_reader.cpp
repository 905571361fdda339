#include "dewmargin/history_reader.h"

#include <algorithm>
#include <string_view>
#include <utility>
#include <variant>
#include <vector>

#include "migrations.h"
#include "period_rows.h"
#include "sqlite_handle.h"

namespace dewmargin {

using store_detail::column_text;
using store_detail::connection;
using store_detail::describe;
using store_detail::statement;

namespace {

std::string_view column_view(sqlite3_stmt* stmt, int column) {
  const unsigned char* text = sqlite3_column_text(stmt, column);
  if (text == nullptr) return {};
  return {reinterpret_cast<const char*>(text), static_cast<std::size_t>(sqlite3_column_bytes(stmt, column))};
}

void assign_column_text(std::string& out, sqlite3_stmt* stmt, int column) {
  const std::string_view text = column_view(stmt, column);
  out.assign(text.data(), text.size());
}

std::optional<subject_type> subject_type_from(std::string_view text) {
  for (const auto s : {subject_type::site, subject_type::zone, subject_type::loop, subject_type::dehumidifier}) {
    if (text == subject_type_name(s)) return s;
  }
  return std::nullopt;
}

// "WHERE a = ?1 AND b >= ?2" from the conditions that are set, with the values to bind.
class where_clause {
 public:
  // `condition` ends with the operator: "subject_id =", "ts_ms <".
  void add(const char* condition, std::variant<std::string, std::int64_t> value) {
    sql_ += params_.empty() ? " WHERE " : " AND ";
    sql_ += condition;
    sql_ += " ?" + std::to_string(params_.size() + 1);
    params_.push_back(std::move(value));
  }
  // "column IN (?n, ?n+1, ...)"
  void add_in(const char* column, const std::vector<std::string>& values) {
    sql_ += params_.empty() ? " WHERE " : " AND ";
    sql_ += column;
    sql_ += " IN (";
    for (std::size_t i = 0; i < values.size(); ++i) {
      sql_ += (i > 0 ? ", ?" : "?") + std::to_string(params_.size() + 1);
      params_.emplace_back(values[i]);
    }
    sql_ += ")";
  }
  [[nodiscard]] const std::string& sql() const { return sql_; }
  void bind(const statement& stmt) const {
    for (std::size_t n = 0; n < params_.size(); ++n) {
      const int index = static_cast<int>(n) + 1;
      if (const auto* text = std::get_if<std::string>(&params_[n])) {
        stmt.bind_text(index, *text);
      } else {
        stmt.bind_int64(index, std::get<std::int64_t>(params_[n]));
      }
    }
  }

 private:
  std::string sql_;
  std::vector<std::variant<std::string, std::int64_t>> params_;
};

}  // namespace

class history_reader::impl {
 public:
  impl(std::filesystem::path file, connection db, int version)
      : file_(std::move(file)), db_(std::move(db)), version_(version) {}

  store_error failure(const std::string& what, int rc) const {
    const auto kind = (rc & 0xff) == SQLITE_CORRUPT ? store_error_kind::corrupt : store_error_kind::sqlite_failure;
    return store_error{kind, file_.string() + ": " + what + ": " + describe(db_.get(), rc)};
  }

  // A time of store_marks (version 3); a missing row reads as 0 (nothing summarised).
  int read_mark(const char* name, std::int64_t& out) const {
    statement stmt;
    int rc = statement::prepare(db_.get(), "SELECT value_ms FROM store_marks WHERE name = ?1", stmt);
    if (rc != SQLITE_OK) return rc;
    stmt.bind_text(1, name);
    rc = sqlite3_step(stmt.get());
    out = rc == SQLITE_ROW ? sqlite3_column_int64(stmt.get(), 0) : 0;
    return rc == SQLITE_ROW || rc == SQLITE_DONE ? SQLITE_OK : rc;
  }

  // Rows of `select` with `column` in [from_ms, to_ms) (and the zone, when given), by time then zone.
  std::optional<store_error> scan(const std::string& select, const char* column, const std::optional<std::string>& zone,
                                  std::int64_t from_ms, std::int64_t to_ms, const char* what,
                                  const std::function<void(sqlite3_stmt*)>& row) const {
    where_clause where;
    if (zone) where.add("zone =", *zone);
    where.add((std::string(column) + " >=").c_str(), from_ms);
    where.add((std::string(column) + " <").c_str(), to_ms);
    const std::string sql = select + where.sql() + " ORDER BY " + column + ", zone";
    statement stmt;
    int rc = statement::prepare(db_.get(), sql, stmt);
    if (rc != SQLITE_OK) return failure(std::string("querying ") + what, rc);
    where.bind(stmt);
    while ((rc = sqlite3_step(stmt.get())) == SQLITE_ROW) row(stmt.get());
    if (rc != SQLITE_DONE) return failure(std::string("reading ") + what, rc);
    return std::nullopt;
  }
  store_result<std::size_t> for_each_event(const event_filter& f, const std::function<void(const stored_event&)>& visit,
                                           bool latest_only = false) const {
    where_clause where;
    if (f.subject_id) where.add("subject_id =", *f.subject_id);
    // Many kinds (a report asks for 8): walk the time index, which is already in (ts_ms, id)
    // order, and test the kind per row; the kind index would need a sort of every row in
    // temporary storage (the "+" keeps SQLite from choosing it). A few kinds: the kind index.
    if (!f.kinds.empty()) where.add_in(f.kinds.size() > 3 && !f.subject_id ? "+kind" : "kind", f.kinds);
    if (f.since) where.add("ts_ms >=", to_unix_ms(*f.since));
    if (f.until) where.add("ts_ms <", to_unix_ms(*f.until));
    const std::string sql = "SELECT id, ts_ms, subject_type, subject_id, kind, json FROM events" + where.sql() +
                            (latest_only ? " ORDER BY ts_ms DESC, id DESC LIMIT 1" : " ORDER BY ts_ms, id");
    statement stmt;
    int rc = statement::prepare(db_.get(), sql, stmt);
    if (rc != SQLITE_OK) return failure("querying events", rc);
    where.bind(stmt);
    std::size_t count = 0;
    stored_event row;
    while ((rc = sqlite3_step(stmt.get())) == SQLITE_ROW) {
      sqlite3_stmt* s = stmt.get();
      row.id = sqlite3_column_int64(s, 0);
      row.record.ts = from_unix_ms(sqlite3_column_int64(s, 1));
      const std::string_view type_text = column_view(s, 2);
      const auto type = subject_type_from(type_text);
      if (!type) {
        return store_error{store_error_kind::corrupt, file_.string() + ": event id " + std::to_string(row.id) +
                                                          ": unknown subject_type '" + std::string(type_text) + "'"};
      }
      row.record.subject = *type;
      // Into the row's strings (reused): no allocation per row once they are large enough.
      assign_column_text(row.record.subject_id, s, 3);
      assign_column_text(row.record.kind, s, 4);
      assign_column_text(row.record.json, s, 5);
      visit(row);
      ++count;
    }
    if (rc != SQLITE_DONE) return failure("reading events", rc);
    return count;
  }

  store_result<std::size_t> for_each_sample(const sample_filter& f,
                                            const std::function<void(const zone_sample&)>& visit) const {
    where_clause where;
    if (f.zone) where.add("zone =", *f.zone);
    if (f.since) where.add("minute_ms >=", to_unix_ms(*f.since));
    if (f.until) where.add("minute_ms <", to_unix_ms(*f.until));
    const std::string sql = "SELECT " + store_detail::minute_columns(version_) + " FROM zone_samples" + where.sql() +
                            " ORDER BY zone, minute_ms";
    statement stmt;
    int rc = statement::prepare(db_.get(), sql, stmt);
    if (rc != SQLITE_OK) return failure("querying samples", rc);
    where.bind(stmt);
    std::size_t count = 0;
    zone_sample row;
    zone_period unused;
    while ((rc = sqlite3_step(stmt.get())) == SQLITE_ROW) {
      store_detail::read_minute_row(stmt.get(), row, unused);
      visit(row);
      ++count;
    }
    if (rc != SQLITE_DONE) return failure("reading samples", rc);
    return count;
  }

  store_result<std::size_t> for_each_period(const sample_filter& f,
                                            const std::function<void(const zone_period&)>& visit) const {
    if (version_ < 3) return for_each_period_v2(f, visit);
    // One read transaction: the marks and the rows come from the same committed state (the
    // service may summarise an hour or delete old minutes meanwhile).
    sqlite3* db = db_.get();
    int rc = store_detail::exec(db, "BEGIN");
    if (rc != SQLITE_OK) return failure("starting a read transaction", rc);
    const read_transaction_end end{db};
    std::int64_t hours_until = 0;
    std::int64_t minutes_from = 0;
    rc = read_mark("hours_until", hours_until);
    if (rc == SQLITE_OK) rc = read_mark("minutes_from", minutes_from);
    if (rc != SQLITE_OK) return failure("reading store_marks", rc);

    constexpr std::int64_t k_hour = store_detail::k_ms_per_hour;
    constexpr std::int64_t k_far = std::int64_t{1} << 60;  // beyond any stored time, either way
    const std::int64_t lo = f.since ? to_unix_ms(*f.since) : -k_far;
    const std::int64_t hi = f.until ? to_unix_ms(*f.until) : k_far;
    std::size_t count = 0;
    zone_period period;
    zone_sample scratch;
    const auto hours = [&](std::int64_t from_ms, std::int64_t to_ms) -> std::optional<store_error> {
      if (from_ms >= to_ms) return std::nullopt;
      return scan(std::string("SELECT ") + store_detail::k_hour_columns + " FROM zone_hours", "hour_ms", f.zone,
                  from_ms, to_ms, "hourly roll-ups", [&](sqlite3_stmt* s) {
                    store_detail::read_hour_row(s, period);
                    visit(period);
                    ++count;
                  });
    };
    const auto minutes = [&](std::int64_t from_ms, std::int64_t to_ms) -> std::optional<store_error> {
      if (from_ms >= to_ms) return std::nullopt;
      return scan("SELECT " + store_detail::minute_columns(version_) + " FROM zone_samples", "minute_ms", f.zone,
                  from_ms, to_ms, "samples", [&](sqlite3_stmt* s) {
                    store_detail::read_minute_row(s, scratch, period);
                    visit(period);
                    ++count;
                  });
    };
    // Hours whose minutes are gone (before minutes_from) are read whenever they overlap the range.
    const std::int64_t first_overlapping_hour = lo - k_hour + 1;
    std::optional<store_error> e;
    if (!f.whole_hours) {
      if (!e) e = hours(first_overlapping_hour, std::min(hi, minutes_from));
      if (!e) e = minutes(lo, hi);
    } else {
      // Whole hours inside [lo, hi) that are summarised come as hours; the edges and the hours
      // not summarised yet as minutes. In time order: leading edge, hours, the rest.
      const std::int64_t a = lo + (((k_hour - lo % k_hour) % k_hour + k_hour) % k_hour);  // lo rounded up
      const std::int64_t b = hi - (((hi % k_hour) + k_hour) % k_hour);                    // hi rounded down
      const std::int64_t he = std::max(a, std::min(b, hours_until));
      if (!e) e = hours(first_overlapping_hour, std::min({a, hi, minutes_from}));
      if (!e) e = minutes(lo, std::min(a, hi));
      if (!e) e = hours(a, he);
      if (!e) e = hours(he, std::min(hi, minutes_from));
      if (!e) e = minutes(he, hi);
    }
    if (e) return *e;
    return count;
  }

  // Versions 1 and 2: hours (only where the minutes were rolled up) then minutes.
  store_result<std::size_t> for_each_period_v2(const sample_filter& f,
                                               const std::function<void(const zone_period&)>& visit) const {
    std::size_t count = 0;
    zone_period period;
    if (version_ >= 2) {
      where_clause where;
      if (f.zone) where.add("zone =", *f.zone);
      if (f.since) where.add("hour_ms >", to_unix_ms(*f.since) - store_detail::k_ms_per_hour);
      if (f.until) where.add("hour_ms <", to_unix_ms(*f.until));
      const std::string sql = std::string("SELECT ") + store_detail::k_hour_columns + " FROM zone_hours" + where.sql() +
                              " ORDER BY hour_ms, zone";
      statement stmt;
      int rc = statement::prepare(db_.get(), sql, stmt);
      if (rc != SQLITE_OK) return failure("querying hourly roll-ups", rc);
      where.bind(stmt);
      while ((rc = sqlite3_step(stmt.get())) == SQLITE_ROW) {
        store_detail::read_hour_row(stmt.get(), period);
        visit(period);
        ++count;
      }
      if (rc != SQLITE_DONE) return failure("reading hourly roll-ups", rc);
    }
    where_clause where;
    if (f.zone) where.add("zone =", *f.zone);
    if (f.since) where.add("minute_ms >=", to_unix_ms(*f.since));
    if (f.until) where.add("minute_ms <", to_unix_ms(*f.until));
    // Version 1 is clustered by zone: ordering by time there costs a sort, which SQLite does
    // in temporary storage, not in our memory.
    const std::string sql = "SELECT " + store_detail::minute_columns(version_) + " FROM zone_samples" + where.sql() +
                            " ORDER BY minute_ms, zone";
    statement stmt;
    int rc = statement::prepare(db_.get(), sql, stmt);
    if (rc != SQLITE_OK) return failure("querying samples", rc);
    where.bind(stmt);
    zone_sample scratch;
    while ((rc = sqlite3_step(stmt.get())) == SQLITE_ROW) {
      store_detail::read_minute_row(stmt.get(), scratch, period);
      visit(period);
      ++count;
    }
    if (rc != SQLITE_DONE) return failure("reading samples", rc);
    return count;
  }

  store_result<std::optional<time_span>> stored_span() const {
    std::vector<std::string> queries = {"SELECT min(ts_ms), max(ts_ms) FROM events",
                                        "SELECT min(minute_ms), max(minute_ms) + 60000 FROM zone_samples"};
    if (version_ >= 2) queries.emplace_back("SELECT min(hour_ms), max(hour_ms) + 3600000 FROM zone_hours");
    std::optional<time_span> span;
    for (const auto& sql : queries) {
      statement stmt;
      int rc = statement::prepare(db_.get(), sql, stmt);
      if (rc != SQLITE_OK) return failure("querying the stored time span", rc);
      rc = sqlite3_step(stmt.get());
      if (rc != SQLITE_ROW) return failure("reading the stored time span", rc);
      if (sqlite3_column_type(stmt.get(), 0) == SQLITE_NULL) continue;
      const timestamp first = from_unix_ms(sqlite3_column_int64(stmt.get(), 0));
      const timestamp last = from_unix_ms(sqlite3_column_int64(stmt.get(), 1));
      if (!span) {
        span = time_span{first, last};
      } else {
        span->first = std::min(span->first, first);
        span->last = std::max(span->last, last);
      }
    }
    return span;
  }

  int version() const { return version_; }

  // Ends a read transaction begun with BEGIN, however the reading that follows returns.
  struct read_transaction_end {
    sqlite3* db;
    ~read_transaction_end() { store_detail::exec(db, "COMMIT"); }
  };

  store_result<restored_state> load_restored_state() const {
    sqlite3* db = db_.get();
    // One read transaction: zones and loops come from the same committed state.
    int rc = store_detail::exec(db, "BEGIN");
    if (rc != SQLITE_OK) return failure("starting a read transaction", rc);
    const read_transaction_end end{db};
    restored_state state;
    statement zones;
    rc = statement::prepare(db,
                            "SELECT zone, band, alarm_active, acknowledged, shelved_until_ms, valve, ts_ms FROM "
                            "zone_state ORDER BY zone",
                            zones);
    if (rc != SQLITE_OK) return failure("querying zone_state", rc);
    while ((rc = sqlite3_step(zones.get())) == SQLITE_ROW) {
      sqlite3_stmt* s = zones.get();
      zone_snapshot z;
      z.zone = column_text(s, 0);
      z.band = column_text(s, 1);
      z.alarm_active = sqlite3_column_int64(s, 2) != 0;
      z.acknowledged = sqlite3_column_int64(s, 3) != 0;
      if (sqlite3_column_type(s, 4) != SQLITE_NULL) z.shelved_until = from_unix_ms(sqlite3_column_int64(s, 4));
      z.valve = column_text(s, 5);
      z.ts = from_unix_ms(sqlite3_column_int64(s, 6));
      state.zones.push_back(std::move(z));
    }
    if (rc != SQLITE_DONE) return failure("reading zone_state", rc);
    statement loops;
    rc = statement::prepare(db, "SELECT loop, setpoint_c, ts_ms FROM loop_state ORDER BY loop", loops);
    if (rc != SQLITE_OK) return failure("querying loop_state", rc);
    while ((rc = sqlite3_step(loops.get())) == SQLITE_ROW) {
      sqlite3_stmt* s = loops.get();
      loop_snapshot l;
      l.loop = column_text(s, 0);
      l.setpoint_c = sqlite3_column_double(s, 1);
      l.ts = from_unix_ms(sqlite3_column_int64(s, 2));
      state.loops.push_back(std::move(l));
    }
    if (rc != SQLITE_DONE) return failure("reading loop_state", rc);
    return state;
  }

  const std::filesystem::path& path() const { return file_; }

 private:
  std::filesystem::path file_;
  connection db_;
  int version_;
};

store_result<history_reader> history_reader::open(const std::filesystem::path& file) {
  return open_with(file, store_detail::open_mode::read_only);
}

store_result<history_reader> history_reader::open_immutable(const std::filesystem::path& file) {
  return open_with(file, store_detail::open_mode::immutable);
}

store_result<history_reader> history_reader::open_with(const std::filesystem::path& file,
                                                       store_detail::open_mode mode) {
  auto db = store_detail::open_history_db(file, mode, store_detail::open_settings{});
  if (!db.ok()) return db.err();
  std::int64_t version = 0;
  const int rc = store_detail::query_int64(db.value().get(), "PRAGMA user_version", version);
  if (rc != SQLITE_OK) {
    return store_error{store_error_kind::sqlite_failure,
                       file.string() + ": reading user_version: " + describe(db.value().get(), rc)};
  }
  return history_reader(std::make_unique<impl>(file, std::move(db).value(), static_cast<int>(version)));
}

history_reader::history_reader(std::unique_ptr<impl> p) : impl_(std::move(p)) {}
history_reader::history_reader(history_reader&&) noexcept = default;
history_reader& history_reader::operator=(history_reader&&) noexcept = default;
history_reader::~history_reader() = default;

store_result<std::size_t> history_reader::for_each_event(const event_filter& filter,
                                                         const std::function<void(const stored_event&)>& visit) const {
  return impl_->for_each_event(filter, visit);
}

store_result<std::vector<stored_event>> history_reader::events(const event_filter& filter) const {
  std::vector<stored_event> rows;
  auto r = impl_->for_each_event(filter, [&](const stored_event& e) { rows.push_back(e); });
  if (!r.ok()) return r.err();
  return rows;
}

store_result<std::optional<stored_event>> history_reader::last_event(const event_filter& filter) const {
  std::optional<stored_event> last;
  auto r = impl_->for_each_event(
      filter, [&](const stored_event& e) { last = e; }, true);
  if (!r.ok()) return r.err();
  return last;
}

store_result<std::size_t> history_reader::for_each_sample(const sample_filter& filter,
                                                          const std::function<void(const zone_sample&)>& visit) const {
  return impl_->for_each_sample(filter, visit);
}

store_result<std::vector<zone_sample>> history_reader::samples(const sample_filter& filter) const {
  std::vector<zone_sample> rows;
  auto r = impl_->for_each_sample(filter, [&](const zone_sample& s) { rows.push_back(s); });
  if (!r.ok()) return r.err();
  return rows;
}

store_result<std::size_t> history_reader::for_each_period(const sample_filter& filter,
                                                          const std::function<void(const zone_period&)>& visit) const {
  return impl_->for_each_period(filter, visit);
}

store_result<std::optional<history_reader::time_span>> history_reader::stored_span() const {
  return impl_->stored_span();
}

int history_reader::schema_version() const { return impl_->version(); }

store_result<restored_state> history_reader::load_restored_state() const { return impl_->load_restored_state(); }

const std::filesystem::path& history_reader::path() const { return impl_->path(); }

}  // namespace dewmargin
