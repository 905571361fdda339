#pragma once
// Helpers shared by the store tests: a temporary directory, rows, and raw SQLite access to
// inspect or disturb a database from outside the store.
#include <gtest/gtest.h>
#include <sqlite3.h>
#include <stdlib.h>

#include <chrono>
#include <condition_variable>
#include <cstdint>
#include <filesystem>
#include <mutex>
#include <string>
#include <thread>
#include <vector>

#include "dewmargin/store.h"

namespace dewmargin::store_test {

// 2026-07-14T13:00:00Z (GNU date -u -d '2026-07-14T13:00:00Z' +%s).
inline constexpr std::int64_t k_t0_ms = 1'784'034'000'000;
inline constexpr std::int64_t k_day_ms = 86'400'000;
inline constexpr auto k_wait = std::chrono::seconds{30};  // bound on every wait; never reached when all is well

// Bounded wait for a condition the writer's thread brings about; polls without any assumption
// about how long it takes.
template <typename Pred>
bool eventually(Pred pred) {
  const auto deadline = std::chrono::steady_clock::now() + k_wait;
  while (!pred()) {
    if (std::chrono::steady_clock::now() > deadline) return false;
    std::this_thread::yield();
  }
  return true;
}

class temp_dir {
 public:
  temp_dir() {
    std::string pattern = (std::filesystem::temp_directory_path() / "dewmargin-store-XXXXXX").string();
    if (mkdtemp(pattern.data()) == nullptr) throw std::runtime_error("mkdtemp failed");
    path_ = pattern;
  }
  ~temp_dir() {
    std::error_code ec;
    std::filesystem::remove_all(path_, ec);
  }
  temp_dir(const temp_dir&) = delete;
  temp_dir& operator=(const temp_dir&) = delete;
  [[nodiscard]] std::filesystem::path file(const std::string& name) const { return path_ / name; }

 private:
  std::filesystem::path path_;
};

// Collects reported errors; lets a test wait for the first one without sleeping.
class error_sink {
 public:
  std::function<void(const std::string&)> callback() {
    return [this](const std::string& line) {
      std::lock_guard<std::mutex> lock(mu_);
      lines_.push_back(line);
      cv_.notify_all();
    };
  }
  bool wait_for(std::size_t count) {
    std::unique_lock<std::mutex> lock(mu_);
    return cv_.wait_for(lock, k_wait, [&] { return lines_.size() >= count; });
  }
  std::vector<std::string> lines() const {
    std::lock_guard<std::mutex> lock(mu_);
    return lines_;
  }

 private:
  mutable std::mutex mu_;
  std::condition_variable cv_;
  std::vector<std::string> lines_;
};

inline event_record make_event(std::int64_t ts_ms, const std::string& zone, const std::string& kind,
                               const std::string& extra_json = "") {
  event_record e;
  e.ts = from_unix_ms(ts_ms);
  e.subject = subject_type::zone;
  e.subject_id = zone;
  e.kind = kind;
  e.json = R"({"ts":")" + format_iso8601_utc(e.ts) + R"(","site":"test-site","zone":")" + zone + R"(","kind":")" +
           kind + "\"" + extra_json + "}";
  return e;
}

inline zone_sample make_sample(std::int64_t minute_ms, const std::string& zone, double margin_k) {
  zone_sample s;
  s.minute_start = from_unix_ms(minute_ms);
  s.zone = zone;
  s.min_margin_k = margin_k;
  s.max_dew_point_c = 16.0;
  s.worst_band = margin_k < 2.0 ? "tight" : "safe";
  s.air_temp_c = 25.0;
  s.rh_pct = 55.0;
  s.surface_min_c = std::nullopt;  // no surface sensor: stored as NULL
  s.supply_c = 17.5;
  return s;
}

// Options for tests: no commits until flush() (no timing in the test), quick retries.
inline store_writer_options test_options(const std::filesystem::path& file, error_sink& errors) {
  store_writer_options o;
  o.path = file;
  o.commit_interval = std::chrono::hours{1};
  o.commit_early_rows = 1'000'000;
  o.maintenance_interval = std::chrono::hours{1};
  o.retry_backoff_initial = std::chrono::milliseconds{5};
  o.retry_backoff_max = std::chrono::milliseconds{20};
  o.report_error = errors.callback();
  o.keep_minute_samples_days = 0;  // roll-ups are tested on their own (test_rollup.cpp)
  return o;
}

inline store_writer open_writer(const store_writer_options& options) {
  auto w = store_writer::open(options);
  if (!w.ok()) throw std::runtime_error(w.err().message);
  return std::move(w).value();
}

// A raw connection for looking at (or interfering with) the file from outside the store.
class raw_db {
 public:
  explicit raw_db(const std::filesystem::path& file, int flags = SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE) {
    if (sqlite3_open_v2(file.string().c_str(), &db_, flags, nullptr) != SQLITE_OK) {
      throw std::runtime_error("cannot open " + file.string());
    }
    sqlite3_busy_timeout(db_, 5000);
  }
  ~raw_db() { sqlite3_close_v2(db_); }
  raw_db(const raw_db&) = delete;
  raw_db& operator=(const raw_db&) = delete;

  // Runs SQL; returns SQLite's result code (tests assert on it).
  int exec(const std::string& sql) { return sqlite3_exec(db_, sql.c_str(), nullptr, nullptr, nullptr); }

  std::int64_t integer(const std::string& sql) {
    sqlite3_stmt* stmt = nullptr;
    std::int64_t v = -1;
    if (sqlite3_prepare_v2(db_, sql.c_str(), -1, &stmt, nullptr) == SQLITE_OK && sqlite3_step(stmt) == SQLITE_ROW) {
      v = sqlite3_column_int64(stmt, 0);
    }
    sqlite3_finalize(stmt);
    return v;
  }
  std::string text(const std::string& sql) {
    sqlite3_stmt* stmt = nullptr;
    std::string v;
    if (sqlite3_prepare_v2(db_, sql.c_str(), -1, &stmt, nullptr) == SQLITE_OK && sqlite3_step(stmt) == SQLITE_ROW) {
      const unsigned char* t = sqlite3_column_text(stmt, 0);
      if (t != nullptr) v = reinterpret_cast<const char*>(t);
    }
    sqlite3_finalize(stmt);
    return v;
  }
  std::vector<std::string> texts(const std::string& sql) {
    sqlite3_stmt* stmt = nullptr;
    std::vector<std::string> v;
    if (sqlite3_prepare_v2(db_, sql.c_str(), -1, &stmt, nullptr) == SQLITE_OK) {
      while (sqlite3_step(stmt) == SQLITE_ROW) {
        const unsigned char* t = sqlite3_column_text(stmt, 0);
        v.emplace_back(t != nullptr ? reinterpret_cast<const char*>(t) : "");
      }
    }
    sqlite3_finalize(stmt);
    return v;
  }

 private:
  sqlite3* db_ = nullptr;
};

inline bool contains(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }

}  // namespace dewmargin::store_test
