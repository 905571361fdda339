// One recorded stream, two ways: through the real dewmargind in event-time mode (clock:
// readings) on a real broker, and through `dewmargin replay`. Both drive the same core by
// the same tick rule (lib/core tick_driver.h), so the events must be identical, object
// for object and in order. Only `service` events are left out: replay has no service to
// start or stop.
#include <gtest/gtest.h>

#include <fstream>
#include <iostream>
#include <set>
#include <string>
#include <vector>

#include "dewmargin/timestamp.h"
#include "service_fixture.h"

namespace dewmargin::test_support {
namespace {

using namespace std::chrono_literals;

constexpr std::int64_t k_t0_s = 1'784'030'400;  // 2026-07-14T12:00:00Z

std::string event_time_config(const std::string& broker_uri, const std::filesystem::path& db) {
  return "site: replay-vs-service\n"
         "broker: { uri: " +
         broker_uri +
         ", client_id: dewmargin-replay-vs-service, keepalive_s: 5 }\n"
         "storage: { path: " +
         db.string() +
         " }\n"
         "publish: { prefix: dm, min_interval_s: 5 }\n"
         "clock: { source: readings, field: /ts }\n"
         "defaults: { margin_warn_k: 2.0, margin_alarm_k: 1.0, hysteresis_k: 0.3, confirm_s: 30, stale_after_s: 90 }\n"
         "loops:\n"
         "  - id: loop-1\n"
         "    supply_temp: { topic: plant/l1/supply, field: /v }\n"
         "    setpoint: { topic: plant/l1/sp, min_c: 15.0, max_c: 20.0, reset_margin_k: 2.0, fall_k_per_min: 0.5 }\n"
         "zones:\n"
         "  - id: room-a\n"
         "    loop: loop-1\n"
         "    air_temp: { topic: r/a/temp, field: /v }\n"
         "    humidity: { topic: r/a/rh, field: /v }\n"
         "    surfaces: [ { topic: r/a/surface, field: /v } ]\n"
         "    window_contact: { topic: r/a/window, field: /state, active: [open] }\n"
         "    valve: { topic: r/a/valve, reopen_after_s: 120 }\n"
         "  - id: room-b\n"
         "    loop: loop-1\n"
         "    air_temp: { topic: r/b/env, field: /t }\n"
         "    humidity: { topic: r/b/env, field: /rh }\n";
}

struct recorded {
  std::int64_t t_s;  // seconds after k_t0_s
  std::string topic;
  std::string payload;  // readings carry their own "ts"; commands and junk carry none
};

std::string iso(std::int64_t t_s) { return format_iso8601_utc(from_unix_ms((k_t0_s + t_s) * 1000)); }
std::string value(std::int64_t t_s, double v) {
  return R"({"ts":")" + iso(t_s) + R"(","v":)" + std::to_string(v) + "}";
}

// Twelve minutes of a humid room and a room whose sensor fails, then a two-hour hole in
// the recording (the jump rule) and the morning after.
std::vector<recorded> recorded_stream() {
  std::vector<recorded> s;
  const auto room_a = [&](std::int64_t t, double rh, double surface) {
    s.push_back({t, "plant/l1/supply", value(t, 16.0)});
    s.push_back({t, "r/a/temp", value(t, 24.0)});
    s.push_back({t, "r/a/rh", value(t, rh)});
    s.push_back({t, "r/a/surface", value(t, surface)});
  };
  const auto room_b = [&](std::int64_t t, double temp, double rh) {
    s.push_back({t, "r/b/env",
                 R"({"ts":")" + iso(t) + R"(","t":)" + std::to_string(temp) + R"(,"rh":)" + std::to_string(rh) + "}"});
  };
  s.push_back({0, "r/a/window", R"({"ts":")" + iso(0) + R"(","state":"closed"})"});
  for (std::int64_t t = 0; t <= 720; t += 20) {
    const double rh = t < 200 ? 50.0 + static_cast<double>(t) / 20.0 : (t < 420 ? 62.0 : 48.0);
    room_a(t, rh, t < 300 ? 17.2 : (t < 420 ? 16.0 : 17.4));
    if (t < 240) room_b(t, 23.5, 45.0 + static_cast<double>(t) / 60.0);
    if (t == 320) {
      // The operator: one command without `by` (rejected), then a proper acknowledgement.
      s.push_back({t, "dm/cmd/ack", R"({"zone":"room-a"})"});
      s.push_back({t, "dm/cmd/ack", R"({"zone":"room-a","by":"op","note":"checking"})"});
    }
    if (t == 340) s.push_back({t, "r/a/surface", R"({"ts":")" + iso(t) + R"(","v":"warm"})"});
    if (t == 360) s.push_back({t, "r/b/env", "garbage"});
    if (t == 380) s.push_back({t, "r/a/window", R"({"ts":")" + iso(t) + R"(","state":"open"})"});
    if (t == 400) s.push_back({t, "r/a/window", R"({"ts":")" + iso(t) + R"(","state":"closed"})"});
  }
  for (std::int64_t t = 720 + 7200; t <= 720 + 7200 + 200; t += 20) {
    room_a(t, 45.0, 18.0);
    room_b(t, 22.0, 40.0);
  }
  return s;
}

std::string csv_field(const std::string& text) {
  std::string out = "\"";
  for (char c : text) {
    if (c == '"') out += '"';
    out += c;
  }
  return out + "\"";
}

std::vector<nlohmann::json> replay_events(const std::vector<recorded>& stream, const std::filesystem::path& dir,
                                          const std::string& config_text) {
  const auto config = dir / "replay.yaml";
  const auto csv = dir / "stream.csv";
  std::ofstream(config) << config_text;
  std::ofstream out(csv);
  out << "ts,topic,payload\n";
  for (const auto& r : stream) out << iso(r.t_s) << ',' << r.topic << ',' << csv_field(r.payload) << '\n';
  out.close();
  const auto result = run_dewmargin({"replay", "--config", config.string(), "--readings", csv.string()}, dir);
  EXPECT_EQ(result.exit_code, 0) << result.out;
  std::vector<nlohmann::json> events;
  std::size_t start = 0;
  while (start < result.out.size()) {
    const std::size_t end = result.out.find('\n', start);
    const std::string line = result.out.substr(start, end == std::string::npos ? std::string::npos : end - start);
    if (!line.empty()) events.push_back(nlohmann::json::parse(line, nullptr, false));
    if (end == std::string::npos) break;
    start = end + 1;
  }
  return events;
}

TEST(ReplayEqualsService, OneRecordedStreamGivesTheSameEventsInBothWays) {
  temp_dir dir("dewmargin-replay-vs-service");
  mosquitto_broker broker;
  broker.start();
  const std::string config = event_time_config(broker.uri(), dir.path() / "history.db");
  const auto stream = recorded_stream();

  const auto expected = replay_events(stream, dir.path(), config);
  ASSERT_GT(expected.size(), 20u);

  mqtt_test_client watcher(broker.uri(), {"dm/#"});
  service_under_test service(broker.uri(), dir.path());
  service.rewrite_config(config);
  service.start();
  ASSERT_TRUE(watcher.wait_for(
      "dm/status", [](const received_message& m) { return as_json(m).value("state", "") == "online"; }, 10s))
      << service.log_text();
  for (const auto& r : stream) watcher.publish(r.topic, r.payload);

  const auto service_events = [&] {
    std::vector<nlohmann::json> events;
    for (const auto& m : watcher.messages_on("dm/events")) {
      auto j = as_json(m);
      if (j.value("kind", "") != "service") events.push_back(std::move(j));
    }
    return events;
  };
  const auto deadline = std::chrono::steady_clock::now() + 20s;
  while (service_events().size() < expected.size() && std::chrono::steady_clock::now() < deadline) {
    watcher.wait_for_count("dm/events", watcher.messages_on("dm/events").size() + 1, 500ms);
  }
  // Nothing more may follow: a short wait for an extra event that must not come.
  watcher.wait_for_count("dm/events", watcher.messages_on("dm/events").size() + 1, 500ms);
  const auto got = service_events();
  EXPECT_EQ(service.stop(), 0);

  std::cout << "[ replay=service ] " << stream.size() << " messages, " << expected.size() << " events each way\n";
  ASSERT_EQ(got.size(), expected.size()) << service.log_text();
  for (std::size_t i = 0; i < expected.size(); ++i) {
    EXPECT_EQ(got[i], expected[i]) << "event " << i;
  }
  // The stream covers what it means to: alarms, an acknowledgement, a rejection, bad and
  // stale inputs, the valve, and the jump over the hole.
  std::set<std::string> kinds;
  for (const auto& e : expected) kinds.insert(e.value("kind", ""));
  for (const char* k : {"band", "valve", "setpoint", "ack", "rejected", "input"}) {
    EXPECT_EQ(kinds.count(k), 1u) << "no " << k << " event in the stream";
  }
}

}  // namespace
}  // namespace dewmargin::test_support
