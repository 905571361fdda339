#pragma once
// Expected failures of the history store. Every message starts with the database file,
// so an operator sees which file is wrong ("FILE: not a dewmargin history database ...").
#include <string>

#include "dewmargin/result.h"

namespace dewmargin {

enum class store_error_kind {
  missing_file,      // the file does not exist (read-only open)
  cannot_open,       // exists but cannot be opened or created (permissions, a directory, no such directory)
  not_a_database,    // not an SQLite file at all
  foreign_database,  // an SQLite file of another program (application_id differs, or tables but no id)
  schema_too_new,    // written by a newer dewmargin; this program does not know its schema
  schema_too_old,    // read-only open of a file that has not been migrated yet
  corrupt,           // SQLite reports corruption, or a stored row this program cannot read
  sqlite_failure,    // any other SQLite error (I/O, disk full, locked past the busy timeout)
  invalid_options,   // the caller passed options that cannot work
};

struct store_error {
  store_error_kind kind;
  std::string message;  // one line, starts with the file name
};

// The project's one result template with the store's own error kinds.
template <typename T>
using store_result = result<T, store_error>;

}  // namespace dewmargin
