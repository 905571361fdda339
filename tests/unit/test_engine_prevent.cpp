// The engine's preventive rules of issue 10, end to end through the core on simulated time:
// close ahead of condensation (rule 1), the start-up permissive (rule 2), the dehumidifier's
// trim-and-respond (rule 3) and quieter states and events (rule 5). Each rule's own table of
// cases is in its unit's test (test_zone_valve.cpp, test_dehumidifier_request.cpp).
#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "engine_fixture.h"

namespace dewmargin {
namespace {

using testing_support::engine_driver;
using testing_support::rh_for;
using testing_support::small_site;

TEST(EnginePrevent, ClosesTheValveBeforeTheSurfaceIsWet) {
  engine_driver d(small_site());
  d.readings(24, rh_for(24, 12.0), 17, 16);
  for (int i = 0; i < 60; ++i) {  // ten minutes steady: margin 5 K, valve open
    d.advance(10);
    d.readings(24, rh_for(24, 12.0), 17, 16);
  }
  ASSERT_EQ(d.last_payload("b/z1/valve"), "open");
  // The room's dew point climbs 0.6 K a minute towards the 17 °C surface.
  double dew_c = 12.0;
  std::string closed_reason;
  double margin_when_closed_k = 0.0;
  for (int i = 0; i < 80 && closed_reason.empty(); ++i) {
    dew_c += 0.1;
    d.advance(10);
    d.readings(24, rh_for(24, dew_c), 17, 16);
    for (const auto& e : d.events("valve")) {
      if (e["zone"] == "z1" && e["to"] == "closed") {
        closed_reason = e["reason"];
        margin_when_closed_k = 17.0 - dew_c;
      }
    }
  }
  ASSERT_FALSE(closed_reason.empty());
  EXPECT_EQ(closed_reason.rfind("condensation expected in ", 0), 0u) << closed_reason;
  EXPECT_GT(margin_when_closed_k, 0.0) << "closed while the surface is still dry";
  EXPECT_LT(margin_when_closed_k, 1.0 + 1e-6) << "not before the margin is below margin_alarm_k";
  EXPECT_EQ(d.last_payload("b/z1/valve"), "closed");
}

TEST(EnginePrevent, ClosesInAlarmWhenTheResetIsAtItsLimit) {
  engine_driver d(small_site());
  // Dew point 17.5 °C: the target 19.5 °C is within max 20 (the setpoint at max 20 is only
  // the fail safe of the start); surface 18.2 °C: margin 0.7 K, alarm.
  for (int i = 0; i < 8; ++i) {
    d.readings(24, rh_for(24, 17.5), 18.2, 19.5);
    d.advance(10);
  }
  ASSERT_EQ(d.last_json("dm/zone/z1/state")["band"], "alarm");
  ASSERT_EQ(d.last_payload("b/z1/valve"), "open") << "the reset still has room";
  // More humid: the target is above max_c, the setpoint sits at 20 °C. (The surface first, or
  // the zone would condense for a moment between the two readings.)
  d.send("b/z1/surface", "19.1");
  for (int i = 0; i < 8; ++i) {
    d.readings(24, rh_for(24, 18.4), 19.1, 19.8);  // the same margin: no trend to close on
    d.advance(10);
  }
  bool reached_max = false;
  for (const auto& p : d.on_topic("dm/loop/loop-a/state")) reached_max = reached_max || p.json()["setpoint_c"] == 20.0;
  ASSERT_TRUE(reached_max);
  ASSERT_EQ(d.last_json("dm/zone/z1/state")["band"], "alarm");
  EXPECT_EQ(d.last_payload("b/z1/valve"), "closed");
  EXPECT_EQ(d.events("valve").back()["reason"], "supply reset at its limit");
}

TEST(EnginePrevent, HoldsTheValveUntilTheAirIsDryEnoughForTheWater) {
  engine_driver d(small_site());
  // z1's dew point 15.5 °C, supply 16 °C: only 0.5 K below, the permissive needs 1.0 K.
  d.readings(24, rh_for(24, 15.5), 18, 16);
  d.advance(1);
  EXPECT_EQ(d.last_payload("b/z1/valve"), "closed");
  EXPECT_EQ(d.last_payload("b/z2/valve"), "OPEN") << "z2 is dry enough";
  const auto held = d.last_json("dm/zone/z1/state");
  EXPECT_EQ(held["valve"], "closed");
  EXPECT_EQ(held["valve_hold"], "dew point 15.5 °C above supply 16.0 °C - 1.0 K");
  // A held zone counts for the reset: the setpoint falls from max_c towards its dew point + 2 K.
  const std::string reason = d.last_json("dm/loop/loop-a/state")["reason"];
  EXPECT_NE(reason.find("towards 17.50 °C: z1 dew point 15.50 °C + 2.00 K"), std::string::npos) << reason;
  // And it asks the dehumidifier for drier air at its next step.
  d.advance(130);
  d.readings(24, rh_for(24, 15.5), 18, 16);
  const auto dehumidify = d.events("dehumidify");
  ASSERT_FALSE(dehumidify.empty());
  EXPECT_EQ(dehumidify.back()["reason"], "trim-and-respond: 1 request, worst z1 (held by the permissive): -0.30 K");
  // The plant follows the setpoint: the water is warm enough now.
  d.send("plant/a/supply", "17.4");
  d.advance(1);
  EXPECT_EQ(d.last_payload("b/z1/valve"), "open");
  EXPECT_EQ(d.events("valve").back()["reason"], "start-up permissive met");
  EXPECT_TRUE(d.last_json("dm/zone/z1/state")["valve_hold"].is_null());
}

TEST(EnginePrevent, TheOpenMarginComesFromTheConfig) {
  site_config cfg = small_site();
  cfg.zones[0].valve->open_margin_k = 0.2;
  engine_driver d(cfg);
  d.readings(24, rh_for(24, 15.5), 18, 16);
  d.advance(1);
  EXPECT_EQ(d.last_payload("b/z1/valve"), "open") << "0.5 K below the supply is enough for 0.2 K";
}

TEST(EnginePrevent, AMarginSourceChangeIsPublishedAtOnce) {
  site_config cfg = small_site();
  cfg.publish.min_interval_s = 3600;  // moved values alone would wait an hour
  engine_driver d(cfg);
  d.readings(24, 50, 17, 16);
  d.advance(1);
  ASSERT_EQ(d.last_json("dm/zone/z1/state")["margin_source"], "surface");
  for (int i = 0; i < 25; ++i) {  // the surface sensor falls silent; it goes stale after 180 s
    d.advance(10);
    d.readings_without("b/z1/surface");
  }
  const auto state = d.last_json("dm/zone/z1/state");
  EXPECT_EQ(state["band"], "safe") << "no band change drives this publication";
  EXPECT_EQ(state["margin_source"], "supply");
  EXPECT_TRUE(state["surface_min_c"].is_null());
}

TEST(EnginePrevent, TheDehumidifierRespondsToZonesThatAreTight) {
  engine_driver d(small_site());
  // z1: dew point 15.5 °C, surface 17 °C: margin 1.5 K, tight; supply 17 °C so the valve opens.
  for (int i = 0; i < 60; ++i) {
    d.readings(24, rh_for(24, 15.5), 17, 17);
    d.advance(10);
  }
  ASSERT_EQ(d.last_json("dm/zone/z1/state")["band"], "tight");
  const auto ev = d.events("dehumidify");
  ASSERT_GE(ev.size(), 4u) << "a step every 120 s";
  // Feed-forward: coldest surface 17 - 3 = 14 °C (max); then down 0.3 K a step.
  EXPECT_EQ(ev.front()["to"], 14.0);
  EXPECT_LT(ev.back()["to"].get<double>(), 13.0);
  EXPECT_EQ(ev.back()["reason"], "trim-and-respond: 1 request, worst z1 (tight): -0.30 K");
}

// Rule 4: the unit's fault switch raises one alarm on the unit and suppresses by design its
// zones' tight/alarm annunciation; condensing still annunciates.
TEST(EnginePrevent, AUnitFaultIsOneAlarmAndSuppressesItsZonesAlarmBand) {
  site_config cfg = small_site();
  cfg.dehumidifiers[0].fault = testing_support::topic_input("plant/doas/fault");
  cfg.dehumidifiers[0].fault->active = {"fault"};
  cfg.dehumidifiers[0].supply_dew_point = testing_support::topic_input("plant/doas/supply-dp");
  engine_driver d(cfg);
  d.readings(24, 50, 17, 16);
  d.send("plant/doas/fault", "ok");
  d.send("plant/doas/supply-dp", "12.9");
  d.advance(1);
  auto unit = d.last_json("dm/dehumidifier/doas-1/state");
  ASSERT_FALSE(unit.is_null());
  EXPECT_EQ(unit["fault"], false);
  EXPECT_EQ(unit["supply_dew_point_c"], 12.9);

  d.send("plant/doas/fault", "fault");
  d.advance(1);
  unit = d.last_json("dm/dehumidifier/doas-1/state");
  EXPECT_EQ(unit["fault"], true);
  EXPECT_EQ(unit["reason"], "fault switch active");
  EXPECT_EQ(unit["alarm"]["active"], true);
  EXPECT_EQ(unit["alarm"]["acknowledged"], false);
  const auto unit_event = d.events("band").back();
  EXPECT_EQ(unit_event["dehumidifier"], "doas-1");
  EXPECT_EQ(unit_event["from"], "normal");
  EXPECT_EQ(unit_event["to"], "fault");

  // z1 falls into `alarm` (margin 0.5 K): logged, marked, not annunciated.
  for (int i = 0; i < 8; ++i) {
    d.readings(24, rh_for(24, 16.5), 17, 16);
    d.advance(10);
  }
  const auto z1 = d.last_json("dm/zone/z1/state");
  ASSERT_EQ(z1["band"], "alarm");
  EXPECT_EQ(z1["alarm"]["active"], false);
  EXPECT_EQ(z1["suppressed_by"], "doas-1");
  bool marked = false;
  for (const auto& e : d.events("band")) {
    if (e.contains("zone") && e["zone"] == "z1" && e["to"] == "alarm") marked = e["suppressed_by"] == "doas-1";
  }
  EXPECT_TRUE(marked);

  // The unit's alarm is acknowledged like a zone's, by its id.
  d.send("dm/cmd/ack", R"({"zone":"doas-1","by":"JK"})");
  const auto ack = d.events("ack").back();
  EXPECT_EQ(ack["dehumidifier"], "doas-1");
  EXPECT_EQ(d.last_json("dm/dehumidifier/doas-1/state")["alarm"]["acknowledged"], true);

  // Condensing always annunciates.
  d.send("b/z1/wet", "wet");
  d.advance(1);
  EXPECT_EQ(d.last_json("dm/zone/z1/state")["band"], "condensing");
  EXPECT_EQ(d.last_json("dm/zone/z1/state")["alarm"]["active"], true);
}

TEST(EnginePrevent, AUnitThatCannotDeliverIsAFaultAfterFaultAfterS) {
  site_config cfg = small_site();
  cfg.dehumidifiers[0].supply_dew_point = testing_support::topic_input("plant/doas/supply-dp");
  engine_driver d(cfg);
  // Request 13 °C (feed-forward); the unit delivers 15.5 °C: 2.5 K above.
  for (int i = 0; i < 59; ++i) {
    d.readings(24, 50, 17, 16);
    d.send("plant/doas/supply-dp", "15.5");
    d.advance(10);
  }
  EXPECT_EQ(d.last_json("dm/dehumidifier/doas-1/state")["fault"], false) << "not yet 600 s";
  for (int i = 0; i < 3; ++i) {
    d.readings(24, 50, 17, 16);
    d.send("plant/doas/supply-dp", "15.5");
    d.advance(10);
  }
  const auto unit = d.last_json("dm/dehumidifier/doas-1/state");
  EXPECT_EQ(unit["fault"], true);
  EXPECT_NE(unit["reason"].get<std::string>().find("above the request"), std::string::npos) << unit.dump();
}

}  // namespace
}  // namespace dewmargin
