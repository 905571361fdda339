#include "fault_support.h"

#include <gtest/gtest.h>
#include <sqlite3.h>
#include <unistd.h>

#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <map>
#include <sstream>
#include <stdexcept>

#include "logging.h"

namespace dewmargin::test_support {

// ---- table ---------------------------------------------------------------------------

fault_table& fault_table::instance() {
  static fault_table table;
  return table;
}

void fault_table::add(fault_row row) { rows_.push_back(std::move(row)); }

std::size_t fault_table::failed() const {
  return static_cast<std::size_t>(
      std::count_if(rows_.begin(), rows_.end(), [](const fault_row& r) { return !r.passed; }));
}

std::string fault_table::render() const {
  const std::vector<std::string> head{"case", "injected", "survived", "lost", "dup", "crashes", "result", "figures"};
  std::vector<std::vector<std::string>> cells;
  for (const auto& r : rows_) {
    cells.push_back({r.name, std::to_string(r.injected), std::to_string(r.survived), std::to_string(r.lost),
                     std::to_string(r.duplicates), std::to_string(r.crashes), r.passed ? "ok" : "FAIL", r.figures});
  }
  std::vector<std::size_t> width(head.size());
  for (std::size_t i = 0; i < head.size(); ++i) width[i] = head[i].size();
  for (const auto& row : cells) {
    for (std::size_t i = 0; i + 1 < row.size(); ++i) width[i] = std::max(width[i], row[i].size());
  }
  const auto line = [&](const std::vector<std::string>& row) {
    std::string out;
    for (std::size_t i = 0; i < row.size(); ++i) {
      out += row[i];
      if (i + 1 < row.size()) out += std::string(width[i] - row[i].size() + 2, ' ');
    }
    return out + "\n";
  };
  std::string out = line(head);
  for (const auto& row : cells) out += line(row);
  std::size_t failed_rows = 0;
  for (const auto& r : rows_) {
    if (r.passed) continue;
    if (failed_rows++ == 0) out += "\nfailed expectations:\n";
    out += "- " + r.name + ": expected " + r.expected + "; " + r.why + "\n";
  }
  out +=
      "\n" + std::to_string(rows_.size() - failed_rows) + " rows ok, " + std::to_string(failed_rows) + " rows failed\n";
  return out;
}

void record(fault_row row) {
  if (!row.passed) ADD_FAILURE() << row.name << ": expected " << row.expected << "; " << row.why;
  fault_table::instance().add(std::move(row));
}

// ---- site ----------------------------------------------------------------------------

std::string fault_site_config(const std::string& broker_uri, const std::filesystem::path& db_path,
                              const site_timing& t) {
  std::ostringstream c;
  c << "site: fault-suite\n"
    << "broker: { uri: " << broker_uri << ", client_id: dewmargin-fault-suite, keepalive_s: " << t.keepalive_s << " }\n"
    << "storage: { path: " << db_path.string() << " }\n"
    << "publish: { prefix: dm, min_interval_s: 1 }\n"
    << "defaults: { margin_warn_k: 2.0, margin_alarm_k: 1.0, hysteresis_k: 0.3, confirm_s: " << t.confirm_s
    << ", stale_after_s: " << t.stale_after_s << " }\n"
    << "loops:\n"
    << "  - id: loop-1\n"
    << "    supply_temp: { topic: plant/l1/supply }\n"
    << "    setpoint: { topic: plant/l1/sp, min_c: 15.0, max_c: " << k_setpoint_max_c
    << ", reset_margin_k: 2.0, fall_k_per_min: 600 }\n"
    << "zones:\n"
    << "  - id: room-a\n"
    << "    loop: loop-1\n"
    << "    air_temp: { topic: r/a/temp }\n"
    << "    humidity: { topic: r/a/rh }\n"
    << "    surfaces: [ { topic: r/a/surface } ]\n"
    << "    condensation_switch: { topic: r/a/wet, active: [\"1\"] }\n"
    << "    window_contact: { topic: r/a/window, active: [open] }\n"
    << "    valve: { topic: r/a/valve, reopen_after_s: " << t.reopen_after_s << " }\n"
    << "  - id: room-b\n"
    << "    loop: loop-1\n"
    << "    air_temp: { topic: r/b/env, field: /t }\n"
    << "    humidity: { topic: r/b/env, field: /rh }\n";
  return c.str();
}

fault_site::fault_site(site_timing timing, broker_options broker_opts, const std::string& dir_prefix)
    : broker(std::move(broker_opts)),
      dir("dewmargin-" + dir_prefix),
      db_path(dir.path() / "history.db"),
      timing_(timing) {
  broker.start();
  service = std::make_unique<service_under_test>(broker.uri(), dir.path());
  write_config(timing_);
  watcher = std::make_unique<mqtt_test_client>(broker.uri(), std::vector<std::string>{"dm/#", "plant/#", "r/a/valve"});
}

fault_site::~fault_site() {
  if (::testing::Test::HasFailure() && service) {
    const std::string log = service->log_text();
    std::cerr << "---- dewmargind log (last 6000 bytes)\n"
              << (log.size() > 6000 ? log.substr(log.size() - 6000) : log) << "----\n";
  }
}

void fault_site::write_config(const site_timing& timing) {
  timing_ = timing;
  service->rewrite_config(fault_site_config(broker.uri(), db_path, timing));
}

void fault_site::change_db_path(const std::filesystem::path& path) {
  db_path = path;
  write_config(timing_);
}

bool fault_site::start_service() {
  const std::size_t from = watcher->size();
  service->start();
  return watcher
      ->wait_for(
          "dm/status", [](const received_message& m) { return as_json(m).value("state", "") == "online"; },
          std::chrono::seconds(10), from)
      .has_value();
}

void fault_site::feed(double surface_c, double rh_pct, bool with_humidity) {
  watcher->publish("plant/l1/supply", "16.0");
  watcher->publish("r/a/surface", std::to_string(surface_c));
  watcher->publish("r/a/temp", "24.0");
  if (with_humidity) watcher->publish("r/a/rh", std::to_string(rh_pct));
  watcher->publish("r/a/wet", "0");
  watcher->publish("r/a/window", "closed");
  if (with_humidity) watcher->publish("r/b/env", R"({"t": 23.5, "rh": 45})");
}

std::optional<nlohmann::json> fault_site::zone_state(const std::string& zone, std::size_t from) {
  const auto all = payloads_on(*watcher, "dm/zone/" + zone + "/state", from);
  if (all.empty()) return std::nullopt;
  return nlohmann::json::parse(all.back(), nullptr, false);
}

std::optional<nlohmann::json> fault_site::wait_zone(const std::string& zone,
                                                    const std::function<bool(const nlohmann::json&)>& accept,
                                                    std::chrono::milliseconds timeout, std::size_t from) {
  const auto m = watcher->wait_for(
      "dm/zone/" + zone + "/state",
      [&](const received_message& r) {
        const auto j = as_json(r);
        return j.is_object() && accept(j);
      },
      timeout, from);
  if (!m) return std::nullopt;
  return as_json(*m);
}

// ---- probes --------------------------------------------------------------------------

std::uint64_t resident_kib(pid_t pid) {
  std::ifstream in("/proc/" + std::to_string(pid) + "/status");
  std::string line;
  while (std::getline(in, line)) {
    if (line.rfind("VmRSS:", 0) == 0) return std::strtoull(line.c_str() + 6, nullptr, 10);
  }
  return 0;
}

error_lines count_error_lines(const std::string& log, const std::string& about) {
  error_lines out;
  std::map<std::string, std::size_t> per_problem;
  std::istringstream in(log);
  std::string line;
  while (std::getline(in, line)) {
    // "2026-01-01T00:00:00.000Z error text"
    const auto level_at = line.find(' ');
    if (level_at == std::string::npos || line.compare(level_at + 1, 6, "error ") != 0) continue;
    const std::string text = line.substr(level_at + 7);
    if (text.find(about) == std::string::npos) continue;
    ++out.total;
    out.most_for_one_problem =
        std::max(out.most_for_one_problem, ++per_problem[daemon::problem_reporter::problem_key(text)]);
  }
  return out;
}

std::size_t count_lines(const std::string& log, const std::string& needle) {
  std::size_t n = 0;
  std::istringstream in(log);
  std::string line;
  while (std::getline(in, line)) {
    if (line.find(needle) != std::string::npos) ++n;
  }
  return n;
}

namespace {

struct db_handle {
  sqlite3* db = nullptr;
  ~db_handle() { sqlite3_close(db); }
};

}  // namespace

std::string integrity_check(const std::filesystem::path& db) {
  db_handle h;
  if (sqlite3_open_v2(db.c_str(), &h.db, SQLITE_OPEN_READONLY, nullptr) != SQLITE_OK) {
    return std::string("cannot open: ") + sqlite3_errmsg(h.db);
  }
  sqlite3_busy_timeout(h.db, 5000);
  sqlite3_stmt* st = nullptr;
  if (sqlite3_prepare_v2(h.db, "PRAGMA integrity_check", -1, &st, nullptr) != SQLITE_OK) {
    return std::string("cannot check: ") + sqlite3_errmsg(h.db);
  }
  std::string answer;
  while (sqlite3_step(st) == SQLITE_ROW) {
    if (!answer.empty()) answer += "; ";
    answer += reinterpret_cast<const char*>(sqlite3_column_text(st, 0));
  }
  sqlite3_finalize(st);
  return answer.empty() ? std::string("no answer: ") + sqlite3_errmsg(h.db) : answer;
}

std::vector<std::string> stored_events(const std::filesystem::path& db) {
  std::vector<std::string> out;
  db_handle h;
  if (sqlite3_open_v2(db.c_str(), &h.db, SQLITE_OPEN_READONLY, nullptr) != SQLITE_OK) return out;
  sqlite3_busy_timeout(h.db, 5000);
  sqlite3_stmt* st = nullptr;
  if (sqlite3_prepare_v2(h.db, "SELECT json FROM events ORDER BY id", -1, &st, nullptr) != SQLITE_OK) return out;
  while (sqlite3_step(st) == SQLITE_ROW) {
    out.emplace_back(reinterpret_cast<const char*>(sqlite3_column_text(st, 0)));
  }
  sqlite3_finalize(st);
  return out;
}

std::optional<std::int64_t> query_int(const std::filesystem::path& db, const std::string& sql) {
  db_handle h;
  if (sqlite3_open_v2(db.c_str(), &h.db, SQLITE_OPEN_READONLY, nullptr) != SQLITE_OK) return std::nullopt;
  sqlite3_busy_timeout(h.db, 2000);
  sqlite3_stmt* st = nullptr;
  if (sqlite3_prepare_v2(h.db, sql.c_str(), -1, &st, nullptr) != SQLITE_OK) return std::nullopt;
  std::optional<std::int64_t> out;
  if (sqlite3_step(st) == SQLITE_ROW) out = sqlite3_column_int64(st, 0);
  sqlite3_finalize(st);
  return out;
}

void run_sql(const std::filesystem::path& db, const std::string& sql) {
  db_handle h;
  if (sqlite3_open(db.c_str(), &h.db) != SQLITE_OK) throw std::runtime_error("cannot open " + db.string());
  char* err = nullptr;
  if (sqlite3_exec(h.db, sql.c_str(), nullptr, nullptr, &err) != SQLITE_OK) {
    const std::string text = err ? err : "unknown error";
    sqlite3_free(err);
    throw std::runtime_error(db.string() + ": " + text);
  }
}

std::string file_bytes(const std::filesystem::path& file) {
  std::ifstream in(file, std::ios::binary);
  std::ostringstream out;
  out << in.rdbuf();
  return out.str();
}

delivery_count compare_delivery(const std::vector<std::string>& produced, const std::vector<std::string>& received) {
  delivery_count c;
  c.produced = produced.size();
  c.received = received.size();
  std::map<std::string, std::size_t> got;
  for (const auto& r : received) ++got[r];
  std::map<std::string, std::size_t> made;
  for (const auto& p : produced) ++made[p];
  for (const auto& [payload, n] : made) {
    const auto it = got.find(payload);
    const std::size_t have = it == got.end() ? 0 : it->second;
    if (have < n) {
      c.lost += n - have;
      if (c.lost_examples.size() < 5) c.lost_examples.push_back(payload);
    }
  }
  for (const auto& example : c.lost_examples) std::fprintf(stderr, "lost: %s\n", example.c_str());
  for (const auto& [payload, n] : got) {
    const auto it = made.find(payload);
    const std::size_t want = it == made.end() ? 0 : it->second;
    if (n > want && want > 0) c.duplicates += n - want;
  }
  return c;
}

std::vector<std::string> payloads_on(const mqtt_test_client& c, const std::string& topic, std::size_t from) {
  std::vector<std::string> out;
  const auto all = c.messages();
  for (std::size_t i = from; i < all.size(); ++i) {
    if (all[i].topic == topic) out.push_back(all[i].payload);
  }
  return out;
}

std::string seconds_text(std::chrono::steady_clock::duration d) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.2f s", std::chrono::duration<double>(d).count());
  return buf;
}

bool running_as_root() { return geteuid() == 0; }

}  // namespace dewmargin::test_support
