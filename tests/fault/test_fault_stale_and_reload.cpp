// A humidity sensor that falls silent (fail safe within stale_after_s + 2 s, then recover),
// and SIGHUP with broken configs (random bytes among them) and then a valid one.
#include <gtest/gtest.h>
#include <signal.h>

#include <random>
#include <thread>

#include "fault_support.h"

namespace dewmargin::test_support {
namespace {

using namespace std::chrono_literals;
using steady = std::chrono::steady_clock;

struct fail_safe_times {
  std::optional<double> unknown_s, valve_closed_s, setpoint_max_s;
};

TEST(FaultInputs, StaleHumidityFailsSafeWithinStaleAfterPlusTwoSecondsAndRecovers) {
  site_timing timing;
  timing.stale_after_s = 2;
  timing.reopen_after_s = 1;
  fault_site site(timing, {}, "fault-stale");
  ASSERT_TRUE(site.start_service());
  const auto sp_now = [&]() -> std::optional<double> {
    const auto sp = payloads_on(*site.watcher, "plant/l1/sp");
    if (sp.empty()) return std::nullopt;
    return std::stod(sp.back());
  };
  const auto valve_now = [&]() -> std::string {
    const auto v = payloads_on(*site.watcher, "r/a/valve");
    return v.empty() ? std::string{} : v.back();
  };
  const auto band_now = [&]() -> std::string {
    const auto z = site.zone_state("room-a");
    return z ? z->value("band", "") : std::string{};
  };
  const auto healthy = [&] {
    const auto sp = sp_now();
    return band_now() == "safe" && valve_now() == "open" && sp && *sp < k_setpoint_max_c - 0.05;
  };
  auto until = steady::now() + 15s;
  while (!healthy() && steady::now() < until) {
    site.feed(17.5);
    std::this_thread::sleep_for(300ms);
  }
  ASSERT_TRUE(healthy()) << "room-a never safe with the valve open and the setpoint below max";

  // Humidity falls silent in both zones (room-b's sensor sends t and rh together); every
  // other input goes on reporting. room-a has a valve (it closes); room-b has none, so it
  // stays counted for the loop and its unknown dew point must drive the setpoint to max_c.
  site.feed(17.5);
  const auto silent_from = steady::now();
  fail_safe_times t;
  until = silent_from + std::chrono::milliseconds(static_cast<int>((timing.stale_after_s + 6) * 1000));
  while (steady::now() < until && !(t.unknown_s && t.valve_closed_s && t.setpoint_max_s)) {
    site.feed(17.5, 50.0, false);
    std::this_thread::sleep_for(100ms);
    const double now_s = std::chrono::duration<double>(steady::now() - silent_from).count();
    if (!t.unknown_s && band_now() == "unknown") t.unknown_s = now_s;
    if (!t.valve_closed_s && valve_now() == "closed") t.valve_closed_s = now_s;
    const auto sp = sp_now();
    if (!t.setpoint_max_s && sp && *sp >= k_setpoint_max_c - 0.05) t.setpoint_max_s = now_s;
  }
  // Humidity back.
  const auto back_from = steady::now();
  std::optional<double> recovered_s;
  until = back_from + 15s;
  while (steady::now() < until && !recovered_s) {
    site.feed(17.5);
    std::this_thread::sleep_for(200ms);
    if (healthy()) recovered_s = std::chrono::duration<double>(steady::now() - back_from).count();
  }

  const double limit = timing.stale_after_s + 2.0;
  const auto text = [](const std::optional<double>& s) {
    char b[32];
    std::snprintf(b, sizeof b, "%.1f s", s.value_or(-1));
    return s ? std::string(b) : std::string("never");
  };
  fault_row row;
  row.name = "stale humidity";
  row.injected = 1;
  row.survived = site.service->running() ? 1 : 0;
  row.crashes = 1 - row.survived;
  row.figures = "unknown " + text(t.unknown_s) + ", valve closed " + text(t.valve_closed_s) + ", setpoint max " +
                text(t.setpoint_max_s) + " (limit " + text(limit) + "); recovered " + text(recovered_s);
  row.expected = "unknown, valve closed, setpoint max_c within stale_after_s + 2 s; recovery";
  const auto within = [&](const std::optional<double>& s) { return s && *s <= limit; };
  row.passed = row.survived == 1 && within(t.unknown_s) && within(t.valve_closed_s) && within(t.setpoint_max_s) &&
               recovered_s.has_value();
  if (!row.passed) row.why = "seen: " + row.figures;
  record(row);
}

TEST(FaultReload, SighupWithBrokenConfigsKeepsSupervisingAndAValidOneIsTaken) {
  fault_site site({}, {}, "fault-reload");
  ASSERT_TRUE(site.start_service());
  site.feed(17.5);
  ASSERT_TRUE(site.wait_zone(
      "room-a", [](const nlohmann::json& j) { return j["band"] == "safe"; }, 10s));

  std::mt19937 rng(20260101);
  std::string random_bytes(4096, '\0');
  for (auto& c : random_bytes) c = static_cast<char>(std::uniform_int_distribution<int>(0, 255)(rng));
  const std::string valid = fault_site_config(site.broker.uri(), site.db_path, site_timing{});
  const std::vector<std::pair<std::string, std::string>> broken{
      {"4 KiB of random bytes", random_bytes},
      {"empty file", ""},
      {"YAML syntax error", "site: [unclosed\nzones:\n"},
      {"wrong types", "site: broken\nzones: 3\n"},
      {"tab indentation", "site: x\nzones:\n\t- id: a\n"},
      {"NUL bytes", std::string("site: a\0b\n", 10)},
      {"invalid UTF-8 in site", "site: \"caf\xc3\x28\"\n" + valid.substr(valid.find('\n') + 1)},
      {"valid config cut in half", valid.substr(0, valid.size() / 2)},
  };
  bool surface_low = false;
  for (const auto& [name, text] : broken) {
    fault_row row;
    row.name = "SIGHUP, config: " + name;
    row.injected = 1;
    row.expected = "reload rejected (service event), old config in force, supervision goes on";
    site.service->rewrite_config(text);
    std::size_t from = site.watcher->size();
    (void)site.service->send_signal(SIGHUP);
    const auto rejected = site.watcher->wait_for(
        "dm/events",
        [](const received_message& m) {
          const auto j = as_json(m);
          return j.value("kind", "") == "service" && j.value("reason", "").rfind("reload rejected", 0) == 0;
        },
        5s, from);
    // Still supervising: a band change goes out.
    surface_low = !surface_low;
    from = site.watcher->size();
    site.feed(surface_low ? 12.5 : 17.5);
    const auto band = wait_event(*site.watcher, "band", "room-a", 5s, from);
    const bool up = site.service->running();
    row.survived = up ? 1 : 0;
    row.crashes = up ? 0 : 1;
    row.figures = std::string(rejected ? "rejected" : "no rejection event") + ", " +
                  (band ? "band event after" : "no band event after");
    row.passed = up && rejected && band;
    if (!row.passed) row.why = "seen: " + row.figures;
    record(row);
    if (!up) return;
  }
  fault_row row;
  row.name = "SIGHUP, valid config";
  row.injected = 1;
  row.expected = "config reloaded (service event)";
  site.service->rewrite_config(valid);
  const std::size_t from = site.watcher->size();
  (void)site.service->send_signal(SIGHUP);
  const auto reloaded = site.watcher->wait_for(
      "dm/events",
      [](const received_message& m) {
        const auto j = as_json(m);
        return j.value("kind", "") == "service" && j.value("reason", "") == "config reloaded";
      },
      5s, from);
  row.survived = site.service->running() ? 1 : 0;
  row.crashes = 1 - row.survived;
  row.figures = reloaded ? "reloaded" : "no reload event";
  row.passed = reloaded && row.survived == 1;
  if (!row.passed) row.why = "seen: " + row.figures;
  record(row);
}

}  // namespace
}  // namespace dewmargin::test_support
