#pragma once
// Internal: RAII owners of SQLite handles and error wording. Only lib/store (and its white-box
// tests) include this; sqlite3.h stays out of the public headers.
#include <sqlite3.h>

#include <cstddef>
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <utility>

namespace dewmargin::store_detail {

// "SQLITE_BUSY", "SQLITE_IOERR" ...; the extended code is added by describe().
std::string result_code_name(int rc);

// "database is locked (SQLITE_BUSY)"; "disk I/O error (SQLITE_IOERR, extended code 778)".
std::string describe(sqlite3* db, int rc);

class connection {
 public:
  connection() = default;
  explicit connection(sqlite3* db) : db_(db) {}
  connection(connection&& other) noexcept : db_(std::exchange(other.db_, nullptr)) {}
  connection& operator=(connection&& other) noexcept {
    if (this != &other) {
      close();
      db_ = std::exchange(other.db_, nullptr);
    }
    return *this;
  }
  connection(const connection&) = delete;
  connection& operator=(const connection&) = delete;
  ~connection() { close(); }

  [[nodiscard]] sqlite3* get() const { return db_; }
  void close();

 private:
  sqlite3* db_ = nullptr;
};

class statement {
 public:
  statement() = default;
  statement(statement&& other) noexcept : stmt_(std::exchange(other.stmt_, nullptr)) {}
  statement& operator=(statement&& other) noexcept {
    if (this != &other) {
      sqlite3_finalize(stmt_);
      stmt_ = std::exchange(other.stmt_, nullptr);
    }
    return *this;
  }
  statement(const statement&) = delete;
  statement& operator=(const statement&) = delete;
  ~statement() { sqlite3_finalize(stmt_); }

  // Returns SQLite's result code; on success `out` owns the prepared statement.
  static int prepare(sqlite3* db, std::string_view sql, statement& out);

  [[nodiscard]] sqlite3_stmt* get() const { return stmt_; }

  // Binding helpers; text is bound without a copy (the string must outlive the step).
  void bind_text(int index, std::string_view text) const;
  void bind_int64(int index, std::int64_t value) const;
  void bind_double(int index, double value) const;
  void bind_null(int index) const;

  // One overload per value type that the store writes; std::nullopt and nullptr bind NULL.
  void bind(int index, std::string_view text) const { bind_text(index, text); }
  void bind(int index, const std::string& text) const { bind_text(index, text); }
  void bind(int index, const char* text) const { bind_text(index, text); }
  void bind(int index, std::int64_t value) const { bind_int64(index, value); }
  void bind(int index, int value) const { bind_int64(index, value); }
  void bind(int index, double value) const { bind_double(index, value); }
  void bind(int index, std::nullptr_t) const { bind_null(index); }
  template <typename T>
  void bind(int index, const std::optional<T>& value) const {
    if (value) {
      bind(index, *value);
    } else {
      bind_null(index);
    }
  }

  // Binds `values` to ?1 .. ?N, steps once and resets the statement for its next use. Returns
  // the step's result code (SQLITE_DONE for a statement without rows). sqlite3_errmsg still
  // describes a failure after the reset. Text is not copied: the values outlive the call.
  template <typename... Values>
  int run(const Values&... values) const {
    int index = 0;
    (bind(++index, values), ...);
    const int rc = sqlite3_step(stmt_);
    sqlite3_reset(stmt_);
    return rc;
  }

 private:
  sqlite3_stmt* stmt_ = nullptr;
};

// Runs one or more statements without results; returns SQLite's result code.
int exec(sqlite3* db, const char* sql);

// Reads a pragma (or any single-integer query); returns SQLite's result code.
int query_int64(sqlite3* db, const char* sql, std::int64_t& out);

// Reads a single text value; returns SQLite's result code.
int query_text(sqlite3* db, const char* sql, std::string& out);

// Column text as a string ("" for NULL).
std::string column_text(sqlite3_stmt* stmt, int column);

}  // namespace dewmargin::store_detail
