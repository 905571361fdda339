#pragma once
// Internal: opening a history database, checking its identity and migrating its schema.
#include <chrono>
#include <cstdint>
#include <filesystem>
#include <string_view>
#include <vector>

#include "dewmargin/store_error.h"
#include "sqlite_handle.h"

namespace dewmargin::store_detail {

// One schema step: `sql` runs inside the step's transaction, which then sets user_version.
struct migration {
  int version;
  std::string_view sql;
};

// The schema of this program, version 1 .. k_store_schema_version.
const std::vector<migration>& schema_migrations();

enum class open_mode {
  read_write,  // create when missing, migrate when older; the service's writer
  read_only,   // SQLITE_OPEN_READONLY; the file must exist and be at the latest version
  immutable,   // read_only, and the file is taken as unchangeable (URI immutable=1): for a file
               // on read-only media, where a WAL file cannot be opened otherwise (no -shm)
};

struct open_settings {
  std::chrono::milliseconds busy_timeout{5000};
  std::int64_t journal_size_limit_bytes = 64LL * 1024 * 1024;
};

// Opens `file`, refuses foreign, non-SQLite and newer files, and (read_write) creates or
// migrates it. `migrations` must be versions 1..N in order; tests pass their own lists.
[[nodiscard]] store_result<connection> open_history_db(const std::filesystem::path& file, open_mode mode,
                                                       const open_settings& settings,
                                                       const std::vector<migration>& migrations = schema_migrations());

}  // namespace dewmargin::store_detail
