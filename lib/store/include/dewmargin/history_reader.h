#pragma once
// Read-only access to a history database (SQLITE_OPEN_READONLY): works while the service
// writes, thanks to WAL. Used by `dewmargin history`, the report and the service's restore.
#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <functional>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "dewmargin/engine_output.h"
#include "dewmargin/store_error.h"
#include "dewmargin/timestamp.h"
#include "dewmargin/zone_period.h"

namespace dewmargin {
namespace store_detail {
enum class open_mode;  // migrations.h
}  // namespace store_detail

struct event_filter {
  std::optional<std::string> subject_id;  // a zone, loop or dehumidifier id
  std::optional<timestamp> since;         // inclusive
  std::optional<timestamp> until;         // exclusive
  std::vector<std::string> kinds;         // any of these; empty: every kind
};

struct stored_event {
  std::int64_t id = 0;  // insertion order; breaks ties between equal timestamps
  event_record record;
};

struct sample_filter {
  std::optional<std::string> zone;
  std::optional<timestamp> since;  // inclusive, on minute_start
  std::optional<timestamp> until;  // exclusive
  // for_each_period only: an hour that lies whole inside [since, until) may come as its hourly
  // summary (one row instead of sixty; version 3 files). Off: minutes wherever they are kept.
  bool whole_hours = false;
};

class history_reader {
 public:
  // Fails when the file is missing, unreadable, not SQLite, foreign, or of another schema version.
  [[nodiscard]] static store_result<history_reader> open(const std::filesystem::path& file);
  // The same for a file nobody can write (read-only media): SQLite takes it as unchangeable,
  // which a WAL file on such media needs to be readable at all. Never for a file being written.
  [[nodiscard]] static store_result<history_reader> open_immutable(const std::filesystem::path& file);

  history_reader(history_reader&&) noexcept;
  history_reader& operator=(history_reader&&) noexcept;
  history_reader(const history_reader&) = delete;
  history_reader& operator=(const history_reader&) = delete;
  ~history_reader();

  // Events ordered by ts, then id; `visit` is called once per row as it is read. Returns the count.
  [[nodiscard]] store_result<std::size_t> for_each_event(const event_filter& filter,
                                                         const std::function<void(const stored_event&)>& visit) const;
  [[nodiscard]] store_result<std::vector<stored_event>> events(const event_filter& filter) const;
  // The latest event that matches (by ts, then id); nullopt when none does.
  [[nodiscard]] store_result<std::optional<stored_event>> last_event(const event_filter& filter) const;

  // Samples ordered by zone, then minute.
  [[nodiscard]] store_result<std::size_t> for_each_sample(const sample_filter& filter,
                                                          const std::function<void(const zone_sample&)>& visit) const;
  [[nodiscard]] store_result<std::vector<zone_sample>> samples(const sample_filter& filter) const;

  // Everything a report draws from, one row at a time (a year is never held in memory), ordered
  // by start, then zone: hours whose minutes were rolled up (included when they overlap [since,
  // until)), per-minute samples, and with `whole_hours` the summaries of whole hours in place of
  // their minutes. Each minute is counted once. Rows that exist only in version 1 files are read
  // as such (no roll-ups; surface RH computed). The `zone_period` passed to `visit` is reused.
  [[nodiscard]] store_result<std::size_t> for_each_period(const sample_filter& filter,
                                                          const std::function<void(const zone_period&)>& visit) const;

  // The first and last time with a stored sample, roll-up or event; nullopt in an empty file.
  struct time_span {
    timestamp first;
    timestamp last;
  };
  [[nodiscard]] store_result<std::optional<time_span>> stored_span() const;

  // PRAGMA user_version of the file (1, 2 or 3).
  [[nodiscard]] int schema_version() const;

  // Latest snapshot per zone and loop (ordered by their ids), read in one transaction.
  [[nodiscard]] store_result<restored_state> load_restored_state() const;

  [[nodiscard]] const std::filesystem::path& path() const;

 private:
  class impl;
  explicit history_reader(std::unique_ptr<impl> p);
  static store_result<history_reader> open_with(const std::filesystem::path& file, store_detail::open_mode mode);
  std::unique_ptr<impl> impl_;
};

}  // namespace dewmargin
