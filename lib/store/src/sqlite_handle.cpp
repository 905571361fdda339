#include "sqlite_handle.h"

namespace dewmargin::store_detail {

std::string result_code_name(int rc) {
  switch (rc & 0xff) {
    case SQLITE_OK:
      return "SQLITE_OK";
    case SQLITE_ERROR:
      return "SQLITE_ERROR";
    case SQLITE_INTERNAL:
      return "SQLITE_INTERNAL";
    case SQLITE_PERM:
      return "SQLITE_PERM";
    case SQLITE_ABORT:
      return "SQLITE_ABORT";
    case SQLITE_BUSY:
      return "SQLITE_BUSY";
    case SQLITE_LOCKED:
      return "SQLITE_LOCKED";
    case SQLITE_NOMEM:
      return "SQLITE_NOMEM";
    case SQLITE_READONLY:
      return "SQLITE_READONLY";
    case SQLITE_INTERRUPT:
      return "SQLITE_INTERRUPT";
    case SQLITE_IOERR:
      return "SQLITE_IOERR";
    case SQLITE_CORRUPT:
      return "SQLITE_CORRUPT";
    case SQLITE_NOTFOUND:
      return "SQLITE_NOTFOUND";
    case SQLITE_FULL:
      return "SQLITE_FULL";
    case SQLITE_CANTOPEN:
      return "SQLITE_CANTOPEN";
    case SQLITE_PROTOCOL:
      return "SQLITE_PROTOCOL";
    case SQLITE_EMPTY:
      return "SQLITE_EMPTY";
    case SQLITE_SCHEMA:
      return "SQLITE_SCHEMA";
    case SQLITE_TOOBIG:
      return "SQLITE_TOOBIG";
    case SQLITE_CONSTRAINT:
      return "SQLITE_CONSTRAINT";
    case SQLITE_MISMATCH:
      return "SQLITE_MISMATCH";
    case SQLITE_MISUSE:
      return "SQLITE_MISUSE";
    case SQLITE_NOLFS:
      return "SQLITE_NOLFS";
    case SQLITE_AUTH:
      return "SQLITE_AUTH";
    case SQLITE_FORMAT:
      return "SQLITE_FORMAT";
    case SQLITE_RANGE:
      return "SQLITE_RANGE";
    case SQLITE_NOTADB:
      return "SQLITE_NOTADB";
    case SQLITE_NOTICE:
      return "SQLITE_NOTICE";
    case SQLITE_WARNING:
      return "SQLITE_WARNING";
    case SQLITE_ROW:
      return "SQLITE_ROW";
    case SQLITE_DONE:
      return "SQLITE_DONE";
    default:
      return "SQLite code " + std::to_string(rc & 0xff);
  }
}

std::string describe(sqlite3* db, int rc) {
  // sqlite3_errmsg names the last failure of this connection, which is more specific than
  // sqlite3_errstr (e.g. the trigger's message); fall back to the generic text otherwise.
  std::string text = db != nullptr && (sqlite3_extended_errcode(db) == rc || sqlite3_errcode(db) == rc)
                         ? sqlite3_errmsg(db)
                         : sqlite3_errstr(rc);
  text += " (" + result_code_name(rc);
  if (rc > 0xff) text += ", extended code " + std::to_string(rc);
  text += ")";
  return text;
}

void connection::close() {
  if (db_ != nullptr) {
    sqlite3_close_v2(db_);
    db_ = nullptr;
  }
}

int statement::prepare(sqlite3* db, std::string_view sql, statement& out) {
  sqlite3_stmt* stmt = nullptr;
  const int rc =
      sqlite3_prepare_v3(db, sql.data(), static_cast<int>(sql.size()), SQLITE_PREPARE_PERSISTENT, &stmt, nullptr);
  if (rc != SQLITE_OK) {
    sqlite3_finalize(stmt);
    return rc;
  }
  out = statement{};
  out.stmt_ = stmt;
  return SQLITE_OK;
}

// A null destructor is SQLITE_STATIC: SQLite does not copy the text. (The macro itself is an
// old-style cast, which the project's warnings reject.)
void statement::bind_text(int index, std::string_view text) const {
  sqlite3_bind_text(stmt_, index, text.data(), static_cast<int>(text.size()), nullptr);
}
void statement::bind_int64(int index, std::int64_t value) const { sqlite3_bind_int64(stmt_, index, value); }
void statement::bind_double(int index, double value) const { sqlite3_bind_double(stmt_, index, value); }
void statement::bind_null(int index) const { sqlite3_bind_null(stmt_, index); }

int exec(sqlite3* db, const char* sql) { return sqlite3_exec(db, sql, nullptr, nullptr, nullptr); }

int query_int64(sqlite3* db, const char* sql, std::int64_t& out) {
  statement stmt;
  int rc = statement::prepare(db, sql, stmt);
  if (rc != SQLITE_OK) return rc;
  rc = sqlite3_step(stmt.get());
  if (rc == SQLITE_ROW) {
    out = sqlite3_column_int64(stmt.get(), 0);
    return SQLITE_OK;
  }
  return rc;  // SQLITE_DONE: no row
}

int query_text(sqlite3* db, const char* sql, std::string& out) {
  statement stmt;
  int rc = statement::prepare(db, sql, stmt);
  if (rc != SQLITE_OK) return rc;
  rc = sqlite3_step(stmt.get());
  if (rc == SQLITE_ROW) {
    out = column_text(stmt.get(), 0);
    return SQLITE_OK;
  }
  return rc;  // SQLITE_DONE: no row
}

std::string column_text(sqlite3_stmt* stmt, int column) {
  const unsigned char* text = sqlite3_column_text(stmt, column);
  if (text == nullptr) return {};
  return std::string(reinterpret_cast<const char*>(text), static_cast<std::size_t>(sqlite3_column_bytes(stmt, column)));
}

}  // namespace dewmargin::store_detail
