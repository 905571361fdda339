// A restarted service and its restored alarms: held until the zone's own inputs have
// reported (or gone missing), whatever order the readings come back in; never cleared by
// the supply fallback. DEVELOPERS.md, "Start-up grace".
#include <gtest/gtest.h>

#include <algorithm>
#include <array>
#include <string>
#include <vector>

#include "dewmargin/engine.h"
#include "engine_fixture.h"

namespace dewmargin {
namespace {

using testing_support::engine_driver;
using testing_support::small_site;

constexpr std::int64_t k_start_s = 1'800'000'000;

restored_state restored_zone(const std::string& zone, const std::string& band, bool acknowledged,
                             std::optional<timestamp> shelved_until = std::nullopt) {
  restored_state r;
  zone_snapshot z;
  z.zone = zone;
  z.band = band;
  z.alarm_active = true;
  z.acknowledged = acknowledged;
  z.shelved_until = shelved_until;
  z.valve = "closed";
  r.zones.push_back(z);
  return r;
}

struct reading {
  const char* topic;
  const char* payload;
};

std::string order_text(const std::vector<reading>& order) {
  std::string s;
  for (const auto& r : order) s += std::string(s.empty() ? "" : ", ") + r.topic;
  return s;
}

// Every order of z1's air, humidity, surface and the loop's supply, one second apart. The
// surface says condensing (12.5 °C under a 12.93 °C dew point) while the supply (16 °C)
// alone would say safe: the restored, acknowledged alarm must survive every order.
TEST(EngineRestart, RestoredAcknowledgedAlarmIsKeptWhateverOrderTheReadingsComeBackIn) {
  std::vector<reading> order = {
      {"b/z1/temp", "24"}, {"b/z1/rh", "50"}, {"b/z1/surface", "12.5"}, {"plant/a/supply", "16"}};
  std::sort(order.begin(), order.end(),
            [](const reading& a, const reading& b) { return std::string(a.topic) < b.topic; });
  int orders = 0;
  do {
    ++orders;
    const std::string name = order_text(order);
    engine_driver d(small_site(), k_start_s, restored_zone("z1", "condensing", true));
    for (const auto& r : order) {
      d.at(1, r.topic, r.payload);
      for (const auto& e : d.events("band")) {
        if (e["zone"] != "z1") continue;
        EXPECT_EQ(e["to"], "condensing") << name << ": " << e.dump();
        EXPECT_EQ(e["alarm"]["acknowledged"], true) << name << ": " << e.dump();
      }
      const auto z1 = d.last_json("dm/zone/z1/state");
      EXPECT_EQ(z1["alarm"]["active"], true) << name << " after " << r.topic;
      EXPECT_EQ(z1["alarm"]["acknowledged"], true) << name << " after " << r.topic;
      EXPECT_NE(z1["band"], "safe") << name << " after " << r.topic;
      EXPECT_NE(d.last_payload("b/z1/valve"), "open") << name << " after " << r.topic;
    }
    std::vector<nlohmann::json> z1_bands;
    for (const auto& e : d.events("band")) {
      if (e["zone"] == "z1") z1_bands.push_back(e);
    }
    ASSERT_EQ(z1_bands.size(), 1u) << name;
    EXPECT_EQ(z1_bands[0]["from"], "unknown") << name;
    EXPECT_EQ(z1_bands[0]["margin_source"], "surface") << name;
    EXPECT_EQ(d.last_json("dm/zone/z1/state")["band"], "condensing") << name;
    EXPECT_TRUE(d.events("ack").empty()) << name;
  } while (std::next_permutation(order.begin(), order.end(),
                                 [](const reading& a, const reading& b) { return std::string(a.topic) < b.topic; }));
  EXPECT_EQ(orders, 24);
}

// The same orders with a dry surface: the alarm clears, but only once the zone's own
// surface has said so, never on the supply temperature alone.
TEST(EngineRestart, RestoredAlarmClearsOnlyOnTheZonesOwnReadings) {
  std::vector<reading> order = {
      {"b/z1/temp", "24"}, {"b/z1/rh", "50"}, {"b/z1/surface", "17"}, {"plant/a/supply", "16"}};
  const auto less = [](const reading& a, const reading& b) { return std::string(a.topic) < b.topic; };
  std::sort(order.begin(), order.end(), less);
  do {
    const std::string name = order_text(order);
    engine_driver d(small_site(), k_start_s, restored_zone("z1", "condensing", true));
    bool own_all_in = false;
    std::array<bool, 3> seen{};
    for (const auto& r : order) {
      d.at(1, r.topic, r.payload);
      const std::string t = r.topic;
      if (t == "b/z1/temp") seen[0] = true;
      if (t == "b/z1/rh") seen[1] = true;
      if (t == "b/z1/surface") seen[2] = true;
      own_all_in = seen[0] && seen[1] && seen[2];
      if (!own_all_in) {
        EXPECT_EQ(d.last_json("dm/zone/z1/state")["alarm"]["active"], true) << name << " after " << t;
      }
    }
    const auto z1 = d.last_json("dm/zone/z1/state");
    EXPECT_EQ(z1["band"], "safe") << name;
    EXPECT_EQ(z1["alarm"]["active"], false) << name;
    EXPECT_EQ(z1["margin_source"], "surface") << name;
  } while (std::next_permutation(order.begin(), order.end(), less));
}

TEST(EngineRestart, ZoneWithoutSurfaceIsJudgedOnceItsOwnInputsAndTheSupplyHaveReported) {
  // z2 has no surface: the supply is its own reference. Restored in `alarm`, acknowledged.
  engine_driver d(small_site(), k_start_s, restored_zone("z2", "alarm", true));
  d.at(1, "b/z2/temp", "24");
  d.at(1, "b/z2/rh", "60");  // dew point 15.8 °C: margin 0.2 K to a 16 °C supply
  EXPECT_TRUE(d.events("band").empty());
  d.at(1, "plant/a/supply", "16");
  const auto bands = d.events("band");
  ASSERT_EQ(bands.size(), 1u);
  EXPECT_EQ(bands[0]["zone"], "z2");
  EXPECT_EQ(bands[0]["to"], "alarm");
  EXPECT_EQ(bands[0]["alarm"]["acknowledged"], true);  // same band as restored: no re-arm
}

TEST(EngineRestart, AWorseBandThanTheRestoredOneStillReArmsTheAlarm) {
  engine_driver d(small_site(), k_start_s, restored_zone("z1", "alarm", true));
  d.readings(24, 50, 12.5, 16);
  const auto z1 = d.last_json("dm/zone/z1/state");
  EXPECT_EQ(z1["band"], "condensing");
  EXPECT_EQ(z1["alarm"]["acknowledged"], false);
}

TEST(EngineRestart, ShelvingIsKeptWhileTheZoneWaits) {
  const timestamp until = from_unix_ms((k_start_s + 600) * 1000);
  engine_driver d(small_site(), k_start_s, restored_zone("z1", "condensing", true, until));
  d.at(1, "plant/a/supply", "16");
  d.at(1, "b/z1/temp", "24");
  d.at(1, "b/z1/rh", "50");
  EXPECT_EQ(d.last_json("dm/zone/z1/state")["alarm"]["shelved_until"], format_iso8601_utc(until));
  EXPECT_TRUE(d.events("band").empty());
}

// A stored end of shelving beyond what a command can ask (an edited or damaged row) is cut to
// the longest shelving (1440 minutes from the restart), never kept for good.
TEST(EngineRestart, ARestoredShelvingIsNeverLongerThanTheLongestACommandCanAsk) {
  const timestamp year_9999 = from_unix_ms(253'402'300'799'000);
  engine_driver d(small_site(), k_start_s, restored_zone("z1", "condensing", true, year_9999));
  d.at(1, "b/z1/temp", "24");
  const auto until = d.last_json("dm/zone/z1/state")["alarm"]["shelved_until"];
  EXPECT_EQ(until, format_iso8601_utc(from_unix_ms((k_start_s + 1440 * 60) * 1000)));
}

// The surface never reports: after stale_after_s it is missing, and the zone is unknown
// (a fault) rather than cleared by the supply's safe margin; the fault re-arms the alarm.
TEST(EngineRestart, RestoredAlarmIsNotClearedByTheSupplyWhenTheSurfaceGoesMissing) {
  engine_driver d(small_site(), k_start_s, restored_zone("z1", "condensing", true));
  for (int i = 0; i < 4; ++i) {
    d.readings_without("b/z1/surface");
    d.advance(50);
  }
  const auto surface = d.input_events("b/z1/surface");
  ASSERT_EQ(surface.size(), 1u);
  EXPECT_EQ(surface[0]["to"], "missing");
  for (const auto& e : d.events("band")) {
    if (e["zone"] == "z1") {
      EXPECT_EQ(e["to"], "unknown") << e.dump();
    }
  }
  const auto z1 = d.last_json("dm/zone/z1/state");
  EXPECT_EQ(z1["band"], "unknown");
  EXPECT_EQ(z1["alarm"]["active"], true);
  EXPECT_EQ(z1["alarm"]["acknowledged"], false);
  EXPECT_EQ(d.last_payload("b/z1/valve"), "closed");
  // The surface comes back: judged on it from then on.
  d.send("b/z1/surface", "17");
  EXPECT_EQ(d.last_json("dm/zone/z1/state")["band"], "safe");
}

// Without a restored alarm, a zone still waits for its own surface before it is judged, so
// a condensing panel is never first shown `safe` on the supply temperature.
TEST(EngineRestart, FreshZoneWaitsForItsOwnSurfaceBeforeItIsJudged) {
  engine_driver d(small_site());
  d.at(1, "plant/a/supply", "16");
  d.at(1, "b/z1/temp", "24");
  d.at(1, "b/z1/rh", "50");
  for (const auto& e : d.events("band")) {
    EXPECT_NE(e["zone"], "z1") << e.dump();
  }
  EXPECT_TRUE(d.on_topic("b/z1/valve").empty());
  d.at(1, "b/z1/surface", "12.5");
  const auto bands = d.events("band");
  ASSERT_FALSE(bands.empty());
  EXPECT_EQ(bands.back()["zone"], "z1");
  EXPECT_EQ(bands.back()["from"], "unknown");
  EXPECT_EQ(bands.back()["to"], "condensing");
}

TEST(EngineRestart, ACondensationSwitchStillActsWhileTheZoneWaits) {
  engine_driver d(small_site(), k_start_s, restored_zone("z1", "alarm", true));
  d.at(1, "b/z1/wet", "1");
  const auto z1 = d.last_json("dm/zone/z1/state");
  EXPECT_EQ(z1["band"], "condensing");
  EXPECT_EQ(z1["alarm"]["acknowledged"], false);  // condensing is worse than the restored alarm
  EXPECT_EQ(d.last_payload("b/z1/valve"), "closed");
}

}  // namespace
}  // namespace dewmargin
