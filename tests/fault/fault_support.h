#pragma once
// Support for the fault suite: the table of figures every case adds its rows to, a site
// (broker, service, watcher) with a config whose times are short so the suite runs fast,
// and probes of the service from outside (its log, its resident memory, its database).
#include <sys/types.h>

#include <chrono>
#include <cstdint>
#include <filesystem>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "mosquitto_fixture.h"
#include "mqtt_test_client.h"
#include "service_fixture.h"

namespace dewmargin::test_support {

// One row of the printed table. `expected` says what must hold; `passed` whether it did.
struct fault_row {
  std::string name;
  std::uint64_t injected = 0;
  std::uint64_t survived = 0;
  std::uint64_t lost = 0;
  std::uint64_t duplicates = 0;
  std::uint64_t crashes = 0;
  std::string figures;  // the case's own figures ("reconnect max 2.1 s", ...)
  std::string expected;
  bool passed = false;
  std::string why;  // when not passed: what was seen instead
};

// The suite's table: rows are added by the cases, printed once at the end (and written to
// the file named by DEWMARGIN_FAULT_TABLE, when set). Test-only process state: the table
// must outlive every test case to be printed as one.
class fault_table {
 public:
  static fault_table& instance();
  void add(fault_row row);
  [[nodiscard]] std::string render() const;
  [[nodiscard]] std::size_t failed() const;

 private:
  std::vector<fault_row> rows_;
};

// Adds the row and reports a failed expectation to GoogleTest (ADD_FAILURE with the row).
void record(fault_row row);

// Times and thresholds of the suite's site. room-a: air, humidity, surface, condensation
// switch (wet on "1"), window contact, valve; room-b: one JSON sensor (t, rh); loop-1.
struct site_timing {
  double stale_after_s = 60.0;
  double confirm_s = 1.0;
  double reopen_after_s = 1.0;
  double keepalive_s = 2.0;
};
std::string fault_site_config(const std::string& broker_uri, const std::filesystem::path& db_path,
                              const site_timing& timing);

constexpr double k_setpoint_max_c = 20.0;

// A broker, one dewmargind and a watcher subscribed to dm/#, plant/# and r/a/valve.
class fault_site {
 public:
  explicit fault_site(site_timing timing = {}, broker_options broker = {}, const std::string& dir_prefix = "fault");
  ~fault_site();
  fault_site(const fault_site&) = delete;
  fault_site& operator=(const fault_site&) = delete;

  // Starts the service and waits (10 s) for its online status; false when it did not come.
  bool start_service();
  // Every input of both zones and the loop with plausible values (room-a: surface_c).
  // Without humidity: neither r/a/rh nor room-b's JSON sensor (it carries t and rh).
  void feed(double surface_c, double rh_pct = 50.0, bool with_humidity = true);
  // Latest retained-state message of a zone/loop received at index >= from, as JSON.
  std::optional<nlohmann::json> zone_state(const std::string& zone, std::size_t from = 0);
  std::optional<nlohmann::json> wait_zone(const std::string& zone,
                                          const std::function<bool(const nlohmann::json&)>& accept,
                                          std::chrono::milliseconds timeout, std::size_t from = 0);
  void write_config(const site_timing& timing);
  void change_db_path(const std::filesystem::path& db_path);

  mosquitto_broker broker;
  temp_dir dir;
  std::filesystem::path db_path;
  std::unique_ptr<service_under_test> service;
  std::unique_ptr<mqtt_test_client> watcher;

 private:
  site_timing timing_;
};

// VmRSS of a process in KiB (0 when it cannot be read).
std::uint64_t resident_kib(pid_t pid);

// Lines of the service's log at level "error" whose text mentions `about`; and the most
// lines any one problem (problem_reporter's key) got among them.
struct error_lines {
  std::size_t total = 0;
  std::size_t most_for_one_problem = 0;
};
error_lines count_error_lines(const std::string& log, const std::string& about);
// Lines of the log whose text contains `needle` (any level).
std::size_t count_lines(const std::string& log, const std::string& needle);

// PRAGMA integrity_check of a database file, opened read-only: "ok" or SQLite's answer.
std::string integrity_check(const std::filesystem::path& db);
// The json column of every stored event, in insertion order (empty when unreadable).
std::vector<std::string> stored_events(const std::filesystem::path& db);
// The first column of the first row of a query, opened read-only (nullopt on any failure).
std::optional<std::int64_t> query_int(const std::filesystem::path& db, const std::string& sql);
// Runs one SQL script on a file (creating it); throws with SQLite's message on failure.
void run_sql(const std::filesystem::path& db, const std::string& sql);
// The bytes of a file (for "never overwritten").
std::string file_bytes(const std::filesystem::path& file);

// Produced vs received: how many of `produced` never arrived, and how many arrived more
// than once (matched by the exact payload text, which carries the event's time).
struct delivery_count {
  std::size_t produced = 0;
  std::size_t received = 0;
  std::size_t lost = 0;
  std::size_t duplicates = 0;
  std::vector<std::string> lost_examples;  // the first few lost payloads, for the failure message
};
delivery_count compare_delivery(const std::vector<std::string>& produced, const std::vector<std::string>& received);

// Payloads received on topic (from index `from`).
std::vector<std::string> payloads_on(const mqtt_test_client& c, const std::string& topic, std::size_t from = 0);

std::string seconds_text(std::chrono::steady_clock::duration d);

bool running_as_root();

}  // namespace dewmargin::test_support
