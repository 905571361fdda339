// The broker taken away: killed and restarted while readings and alarm transitions flow
// (every event the service produced must reach a persistent QoS 1 subscriber), and a link
// lost for longer than stale_after_s (the service must fail safe on its own, and the plant
// must hear it once the broker is back).
#include <gtest/gtest.h>

#include <algorithm>
#include <csignal>
#include <numeric>
#include <thread>

#include "dewmargin/timestamp.h"
#include "fault_support.h"

namespace dewmargin::test_support {
namespace {

using namespace std::chrono_literals;
using steady = std::chrono::steady_clock;

// Waits until no message has arrived on any topic for `quiet` (bounded by `limit`).
void wait_until_quiet(const mqtt_test_client& c, std::chrono::milliseconds quiet, std::chrono::milliseconds limit) {
  const auto give_up = steady::now() + limit;
  std::size_t seen = c.size();
  auto last_change = steady::now();
  while (steady::now() < give_up && steady::now() - last_change < quiet) {
    std::this_thread::sleep_for(20ms);
    if (c.size() != seen) {
      seen = c.size();
      last_change = steady::now();
    }
  }
}

bool wait_connected(const std::vector<const mqtt_test_client*>& clients, std::chrono::milliseconds limit) {
  const auto give_up = steady::now() + limit;
  while (steady::now() < give_up) {
    if (std::all_of(clients.begin(), clients.end(), [](const mqtt_test_client* c) { return c->connected(); })) {
      return true;
    }
    std::this_thread::sleep_for(20ms);
  }
  return false;
}

// The service's link says "connected to ..." once per connection (an info line, never held back).
std::optional<steady::duration> wait_reconnect_line(service_under_test& s, std::size_t lines_before,
                                                    steady::time_point since, std::chrono::milliseconds limit) {
  const auto give_up = since + limit;
  while (steady::now() < give_up) {
    if (count_lines(s.log_text(), "mqtt: connected to ") > lines_before) return steady::now() - since;
    std::this_thread::sleep_for(20ms);
  }
  return std::nullopt;
}

TEST(FaultBroker, KilledAndRestartedTenTimesWhileAlarmsFlowNothingIsLost) {
  constexpr int k_cycles = 10;
  site_timing timing;
  timing.stale_after_s = 2;  // each outage is longer: the service produces events while the broker is gone
  broker_options bo;
  bo.persistence = true;
  fault_site site(timing, bo, "fault-broker");
  test_client_options persistent;
  persistent.client_id = unique_client_id("fault-events");
  persistent.clean_session = false;
  mqtt_test_client events(site.broker.uri(), {"dm/events"}, persistent);
  ASSERT_TRUE(site.start_service());
  site.feed(17.5);
  ASSERT_TRUE(site.wait_zone(
      "room-a", [](const nlohmann::json& j) { return j["band"] == "safe"; }, 10s));

  std::vector<double> reconnect_s;
  std::uint64_t crashes = 0;
  std::uint64_t survived = 0;
  std::string why;
  for (int cycle = 0; cycle < k_cycles; ++cycle) {
    // Alarm transitions: condensing and back, twice.
    for (int k = 0; k < 4; ++k) {
      site.feed(k % 2 == 0 ? 12.5 : 17.5);
      std::this_thread::sleep_for(100ms);
    }
    // A crashed broker loses what it had not yet saved or forwarded; that would be its loss,
    // not ours: the kill comes once what was sent so far has been forwarded.
    wait_until_quiet(events, 300ms, 5s);
    const std::size_t lines_before = count_lines(site.service->log_text(), "mqtt: connected to ");
    site.broker.kill();
    // The outage outlasts stale_after_s (inputs go missing, valves close, events are made).
    std::this_thread::sleep_for(3s);
    // mosquitto 2.0.11 queues nothing for a persistent session restored from its database
    // until that client has reconnected (tried by hand: a message published before is gone).
    // The service reconnects within about a second, often before the test's subscriber, so
    // it is held (SIGSTOP, far shorter than stale_after_s) until the subscriber is back:
    // what is measured is the service's delivery, not the broker's restore.
    if (!site.service->send_signal(SIGSTOP)) {
      ++crashes;
      why = "the service exited in cycle " + std::to_string(cycle);
      break;
    }
    site.broker.start();
    const auto back = steady::now();
    const bool subscriber_back = wait_connected({&events}, 10s);
    (void)site.service->send_signal(SIGCONT);
    if (!subscriber_back) {
      why = "the event subscriber did not reconnect in cycle " + std::to_string(cycle);
      break;
    }
    const auto took = wait_reconnect_line(*site.service, lines_before, back, 40s);
    if (!site.service->running()) {
      ++crashes;
      why = "the service exited in cycle " + std::to_string(cycle);
      break;
    }
    if (!took) {
      why = "no reconnect within 40 s in cycle " + std::to_string(cycle);
      break;
    }
    reconnect_s.push_back(std::chrono::duration<double>(*took).count());
    ++survived;
    if (!wait_connected({site.watcher.get(), &events}, 10s)) {
      why = "the test clients did not reconnect in cycle " + std::to_string(cycle);
      break;
    }
  }
  site.feed(17.5);
  const std::size_t from = events.size();
  const int exit_code = site.service->stop();
  // The "stopped" service event is the last one produced.
  const bool got_stop = events
                            .wait_for(
                                "dm/events",
                                [](const received_message& m) {
                                  const auto j = as_json(m);
                                  return j.value("kind", "") == "service" && j.value("to", "") == "stopped";
                                },
                                10s, from)
                            .has_value();
  wait_until_quiet(events, 300ms, 3s);
  const auto produced = stored_events(site.db_path);
  const auto delivery = compare_delivery(produced, payloads_on(events, "dm/events"));

  fault_row row;
  row.name = "broker SIGKILL+restart x10";
  row.injected = k_cycles;
  row.survived = survived;
  row.lost = delivery.lost;
  row.duplicates = delivery.duplicates;
  row.crashes = crashes;
  const double max_s = reconnect_s.empty() ? 0.0 : *std::max_element(reconnect_s.begin(), reconnect_s.end());
  const double mean_s = reconnect_s.empty() ? 0.0
                                            : std::accumulate(reconnect_s.begin(), reconnect_s.end(), 0.0) /
                                                  static_cast<double>(reconnect_s.size());
  char fig[200];
  std::snprintf(fig, sizeof fig, "events produced %zu, received %zu; reconnect mean %.2f s, max %.2f s",
                delivery.produced, delivery.received, mean_s, max_s);
  row.figures = fig;
  std::string each = "; reconnect s:";
  for (double s : reconnect_s) {
    char b[16];
    std::snprintf(b, sizeof b, " %.1f", s);
    each += b;
  }
  row.figures += each;
  row.expected = "0 lost, 0 crashes, every reconnect within 35 s, clean stop";
  row.passed = why.empty() && delivery.lost == 0 && crashes == 0 && max_s <= 35.0 && exit_code == 0 && got_stop &&
               delivery.produced > 0;
  if (row.passed) {
  } else if (!why.empty()) {
    row.why = why;
  } else {
    row.why = std::to_string(delivery.lost) + " lost, exit code " + std::to_string(exit_code) +
              (got_stop ? "" : ", no stop event") + (delivery.produced == 0 ? ", no events stored" : "");
  }
  record(row);
}

TEST(FaultBroker, LinkLostLongerThanStaleAfterFailsSafeAndRecovers) {
  site_timing timing;
  timing.stale_after_s = 2;
  broker_options bo;
  bo.persistence = true;
  fault_site site(timing, bo, "fault-link");
  test_client_options persistent;
  persistent.client_id = unique_client_id("fault-plant");
  persistent.clean_session = false;
  mqtt_test_client plant(site.broker.uri(), {"dm/events", "r/a/valve", "plant/l1/sp", "dm/zone/room-a/state"},
                         persistent);
  ASSERT_TRUE(site.start_service());
  const auto settled = [&] {
    const auto z = site.zone_state("room-a");
    const auto sp = payloads_on(plant, "plant/l1/sp");
    const auto valve = payloads_on(plant, "r/a/valve");
    return z && (*z)["band"] == "safe" && !sp.empty() && std::stod(sp.back()) < k_setpoint_max_c - 0.05 &&
           !valve.empty() && valve.back() == "open";
  };
  const auto settle_until = steady::now() + 15s;
  while (!settled() && steady::now() < settle_until) {
    site.feed(17.5);
    std::this_thread::sleep_for(300ms);
  }
  ASSERT_TRUE(settled()) << "room-a never settled safe with the valve open and the setpoint below max";
  std::this_thread::sleep_for(1200ms);  // the broker saves the persistent session every second

  const std::size_t from = plant.size();
  const auto lost_at = std::chrono::system_clock::now();
  site.broker.kill();
  std::this_thread::sleep_for(std::chrono::milliseconds(static_cast<int>((timing.stale_after_s + 3) * 1000)));
  site.broker.start();
  const bool clients_back = wait_connected({site.watcher.get(), &plant}, 15s);
  const auto unknown_event = plant.wait_for(
      "dm/events",
      [](const received_message& m) {
        const auto j = as_json(m);
        return j.value("kind", "") == "band" && j.value("zone", "") == "room-a" && j.value("to", "") == "unknown";
      },
      40s, from);
  const auto valve_closed = plant.wait_for_payload("r/a/valve", "closed", 10s, from);
  const auto sp_max = plant.wait_for(
      "plant/l1/sp", [](const received_message& m) { return std::stod(m.payload) >= k_setpoint_max_c - 0.05; }, 10s,
      from);
  double decided_after_s = -1;
  if (unknown_event) {
    const auto ts = parse_iso8601(as_json(*unknown_event).value("ts", ""));
    if (ts) decided_after_s = std::chrono::duration<double>(ts.value() - lost_at).count();
  }
  // Recovery: readings again.
  const std::size_t back_from = plant.size();
  const auto recover_until = steady::now() + 15s;
  bool recovered = false;
  while (clients_back && !recovered && steady::now() < recover_until) {
    site.feed(17.5);
    std::this_thread::sleep_for(300ms);
    const auto valve = payloads_on(plant, "r/a/valve", back_from);
    const auto z = site.zone_state("room-a");
    recovered = z && (*z)["band"] == "safe" && !valve.empty() && valve.back() == "open";
  }

  fault_row row;
  row.name = "broker link lost > stale_after_s";
  row.injected = 1;
  row.survived = site.service->running() ? 1 : 0;
  row.crashes = 1 - row.survived;
  char fig[200];
  std::snprintf(fig, sizeof fig,
                "unknown decided %.1f s after the loss (limit %.0f s); valve closed %s, sp max %s; recovered %s",
                decided_after_s, timing.stale_after_s + 2, valve_closed ? "yes" : "no", sp_max ? "yes" : "no",
                recovered ? "yes" : "no");
  row.figures = fig;
  row.expected =
      "zone unknown within stale_after_s + 2 s, valve closed and setpoint at max_c delivered on return, "
      "recovery with readings";
  row.passed = row.survived == 1 && unknown_event && decided_after_s >= 0 &&
               decided_after_s <= timing.stale_after_s + 2.0 && valve_closed && sp_max && recovered;
  if (!row.passed) row.why = std::string("seen: ") + fig;
  record(row);
}

}  // namespace
}  // namespace dewmargin::test_support
