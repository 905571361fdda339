// The service SIGKILLed at random moments while it writes: the database stays intact,
// the alarm, acknowledgement, valve and shelving come back exactly, the Last Will marks
// it offline every time, and no reading order after the restart produces an all-clear
// for a zone that was condensing.
#include <gtest/gtest.h>

#include <algorithm>
#include <random>
#include <thread>

#include "fault_support.h"

namespace dewmargin::test_support {
namespace {

using namespace std::chrono_literals;
using steady = std::chrono::steady_clock;

// The acknowledgement and the shelving are in the snapshot table once committed.
bool committed(const std::filesystem::path& db) {
  return query_int(db,
                   "SELECT (SELECT count(*) FROM zone_state WHERE zone='room-a' AND acknowledged=1 AND "
                   "alarm_active=1) + (SELECT count(*) FROM zone_state WHERE zone='room-b' AND shelved_until_ms IS "
                   "NOT NULL)")
             .value_or(0) == 2;
}

TEST(FaultService, SigkilledThirtyTimesWhileWritingRestoresStateExactly) {
  constexpr int k_kills = 30;
  fault_site site({}, {}, "fault-kill");
  const unsigned seed = std::random_device{}();
  std::mt19937 rng(seed);

  ASSERT_TRUE(site.start_service());
  site.feed(12.5);  // room-a condensing: alarm active, valve closed
  ASSERT_TRUE(site.wait_zone(
      "room-a", [](const nlohmann::json& j) { return j["band"] == "condensing"; }, 10s));
  site.watcher->publish("dm/cmd/ack", R"({"zone":"room-a","by":"fault-suite"})");
  site.watcher->publish("dm/cmd/shelve", R"({"zone":"room-b","by":"fault-suite","minutes":600,"reason":"suite"})");
  // Active as well: the state from before the alarm also says acknowledged.
  const auto acked = site.wait_zone(
      "room-a",
      [](const nlohmann::json& j) { return j["alarm"]["active"] == true && j["alarm"]["acknowledged"] == true; },
      10s);
  const auto shelved = site.wait_zone(
      "room-b", [](const nlohmann::json& j) { return j["alarm"]["shelved_until"].is_string(); }, 10s);
  ASSERT_TRUE(acked && shelved);
  const std::string shelved_until = (*shelved)["alarm"]["shelved_until"];
  const auto commit_until = steady::now() + 10s;
  while (!committed(site.db_path) && steady::now() < commit_until) std::this_thread::sleep_for(100ms);
  ASSERT_TRUE(committed(site.db_path)) << "acknowledgement and shelving not committed within 10 s";

  std::uint64_t intact = 0, wills = 0, restored = 0, no_false_clear = 0, crashes = 0, survived = 0;
  std::string integrity_why, restore_why, clear_why, will_why;
  const std::vector<std::pair<std::string, std::string>> readings{{"plant/l1/supply", "16.0"},
                                                                  {"r/a/surface", "12.5"},
                                                                  {"r/a/temp", "24.0"},
                                                                  {"r/a/rh", "50.0"},
                                                                  {"r/a/wet", "0"},
                                                                  {"r/a/window", "closed"},
                                                                  {"r/b/env", R"({"t": 23.5, "rh": 45})"}};
  for (int i = 0; i < k_kills; ++i) {
    // Writing: room-b's humidity swings (band events and snapshots), killed at a random moment.
    const auto kill_at = steady::now() + std::chrono::milliseconds(std::uniform_int_distribution<int>(0, 600)(rng));
    bool wet = false;
    while (steady::now() < kill_at) {
      site.watcher->publish("r/b/env", wet ? R"({"t": 23.5, "rh": 95})" : R"({"t": 23.5, "rh": 45})");
      wet = !wet;
    }
    if (!site.service->running()) {
      ++crashes;
      break;
    }
    ++survived;
    std::size_t from = site.watcher->size();
    site.service->kill_now();
    const auto will = site.watcher->wait_for(
        "dm/status",
        [](const received_message& m) {
          const auto j = as_json(m);
          return j.value("state", "") == "offline" && j.value("reason", "") == "connection lost";
        },
        10s, from);
    if (will) {
      ++wills;
    } else if (will_why.empty()) {
      will_why = "no Last Will after kill " + std::to_string(i + 1);
    }
    const std::string check = integrity_check(site.db_path);
    if (check == "ok") {
      ++intact;
    } else if (integrity_why.empty()) {
      integrity_why = "integrity_check after kill " + std::to_string(i + 1) + ": " + check;
    }

    from = site.watcher->size();
    if (!site.start_service()) {
      restore_why = "no online status after restart " + std::to_string(i + 1);
      break;
    }
    // The restored state is published before any reading is evaluated.
    const auto a = site.wait_zone(
        "room-a", [](const nlohmann::json&) { return true; }, 5s, from);
    const auto b = site.wait_zone(
        "room-b", [](const nlohmann::json&) { return true; }, 5s, from);
    const bool exact = a && b && (*a)["alarm"]["active"] == true && (*a)["alarm"]["acknowledged"] == true &&
                       (*a)["valve"] == "closed" && (*b)["alarm"]["shelved_until"] == shelved_until;
    if (exact) {
      ++restored;
    } else if (restore_why.empty()) {
      restore_why = "after restart " + std::to_string(i + 1) + ": room-a " + (a ? a->dump() : "none") + ", room-b " +
                    (b ? b->dump() : "none");
    }
    // The readings come back in any order; room-a is still condensing.
    auto order = readings;
    std::shuffle(order.begin(), order.end(), rng);
    const std::size_t readings_from = site.watcher->size();
    for (const auto& [topic, payload] : order) site.watcher->publish(topic, payload);
    const auto condensing = site.wait_zone(
        "room-a", [](const nlohmann::json& j) { return j["band"] == "condensing"; }, 5s, readings_from);
    bool false_clear = !condensing.has_value();
    std::string seen;
    for (const auto& p : payloads_on(*site.watcher, "dm/zone/room-a/state", from)) {
      const auto j = nlohmann::json::parse(p, nullptr, false);
      if (!j.is_object()) continue;
      const bool clear = j["band"] == "safe" || j["band"] == "tight" || j["alarm"]["active"] == false ||
                         j["alarm"]["acknowledged"] == false;
      if (clear) {
        false_clear = true;
        seen = j.dump();
      }
    }
    if (!false_clear) {
      ++no_false_clear;
    } else if (clear_why.empty()) {
      std::string order_text;
      for (const auto& [topic, payload] : order) order_text += (order_text.empty() ? "" : ", ") + topic;
      clear_why = "after restart " + std::to_string(i + 1) + " with readings in the order " + order_text + ": " +
                  (seen.empty() ? std::string("room-a never condensing again") : "room-a state " + seen);
    }
  }

  const std::string seed_text = "seed " + std::to_string(seed);
  const auto add = [&](const std::string& name, std::uint64_t ok, const std::string& expected, const std::string& why) {
    fault_row row;
    row.name = name;
    row.injected = k_kills;
    row.survived = survived;
    row.crashes = crashes;
    row.figures = std::to_string(ok) + " of " + std::to_string(k_kills) + " ok; " + seed_text;
    row.expected = expected;
    row.passed = ok == static_cast<std::uint64_t>(k_kills) && crashes == 0;
    row.why = row.passed ? "" : (why.empty() ? "stopped early" : why);
    record(row);
  };
  add("service SIGKILL x30: integrity_check", intact, "PRAGMA integrity_check ok after every kill", integrity_why);
  add("service SIGKILL x30: Last Will", wills, "offline (connection lost) after every kill", will_why);
  add("service SIGKILL x30: state restored", restored,
      "alarm active+acknowledged, valve closed, shelving end restored exactly", restore_why);
  add("service SIGKILL x30: no false all-clear", no_false_clear,
      "condensing zone never safe/tight/cleared/unacknowledged, any reading order", clear_why);
}

}  // namespace
}  // namespace dewmargin::test_support
