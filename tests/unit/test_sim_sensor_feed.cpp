// The simulator's sensors (tools/simulator/model/sensor_feed.h), read through the demo config.
#include <gtest/gtest.h>

#include <map>
#include <nlohmann/json.hpp>

#include "model/simulation.h"
#include "test_sim_helpers.h"

namespace dewmargin::sim {
namespace {

std::unique_ptr<simulation> make(const config_load_result& loaded, std::uint64_t seed = 1,
                                 const std::vector<incident>& extra = {}) {
  EXPECT_TRUE(loaded.ok()) << (loaded.errors.empty() ? "" : loaded.errors.front().to_string());
  simulation_options o;
  o.seed = seed;
  auto demo = testing::demo_scenario("short");
  for (const auto& i : extra) demo.day.incidents.push_back(i);
  auto created = simulation::create(*loaded.config, demo.house, demo.day, o);
  EXPECT_TRUE(created.ok()) << created.err().message;
  return std::move(created.value());
}

incident sensor_incident(incident_kind kind, const std::string& target, sensor_input input, double start_h,
                         double end_h, double value = 0.0) {
  incident i;
  i.kind = kind;
  i.target = target;
  i.input = input;
  i.start_s = start_h * 3600.0;
  i.end_s = end_h * 3600.0;
  i.value = value;
  return i;
}

// Values on one topic with their simulated time of day.
std::vector<std::pair<double, double>> values_on(const std::vector<outbound>& msgs, const std::string& topic) {
  std::vector<std::pair<double, double>> out;
  const timestamp midnight = parse_iso8601("2026-07-14").value();
  for (const auto& m : msgs) {
    if (m.topic != topic) continue;
    const auto j = nlohmann::json::parse(m.payload);
    const auto ts = parse_iso8601(j.at("ts").get<std::string>()).value();
    out.emplace_back(seconds_between(midnight, ts), j.at("value").get<double>());
  }
  return out;
}

// Every message of the first `seconds` of the short day (the start included).
std::vector<outbound> play(simulation& sim, double seconds) {
  std::vector<outbound> out;
  sim.begin(out);
  const double until = sim.now_s() + seconds;
  while (sim.now_s() < until - 1e-9) sim.advance(out);
  return out;
}

TEST(SimSensorFeed, ReportsEachSensorAtItsInterval) {
  auto sim = make(testing::load_demo());
  std::map<std::string, int> per_topic;
  for (const auto& m : play(*sim, 3600.0)) ++per_topic[m.topic];
  struct expected {
    const char* topic;
    int at_least;
    int at_most;
  };
  // In 3600 s with the start included: every 5 s → 721; every 30 s → 120 or 121; every 60 s → 60 or 61.
  for (const expected& e :
       {expected{"plant/qf/ceiling-north/supply-temp", 721, 721},
        expected{"plant/qf/ceiling-north/return-temp", 360, 361}, expected{"plant/qf/ceiling-north/flow", 120, 121},
        expected{"bldg/qf/l1-north-open/air-temp", 60, 61}, expected{"bldg/qf/l1-north-open/rh", 120, 121},
        expected{"bldg/qf/l1-north-open/surface-temp", 120, 121},
        expected{"bldg/qf/l1-south-open/wet-switch", 12, 13}}) {
    EXPECT_GE(per_topic[e.topic], e.at_least) << e.topic;
    EXPECT_LE(per_topic[e.topic], e.at_most) << e.topic;
  }
}

TEST(SimSensorFeed, PayloadCarriesValueAndSimulatedTimeAsJson) {
  auto sim = make(testing::load_demo());
  std::vector<outbound> out;
  sim->begin(out);
  for (int i = 0; i < 12; ++i) sim->advance(out);  // 06:01:00
  bool seen = false;
  for (const auto& m : out) {
    if (m.topic != "bldg/qf/g-lobby/rh") continue;
    const auto j = nlohmann::json::parse(m.payload);
    ASSERT_TRUE(j.at("value").is_number()) << m.payload;
    EXPECT_GT(j.at("value").get<double>(), 0.0);
    EXPECT_LE(j.at("value").get<double>(), 100.0);
    const std::string ts = j.at("ts").get<std::string>();
    EXPECT_EQ(ts.substr(0, 11), "2026-07-14T") << m.payload;
    EXPECT_EQ(ts.back(), 'Z');
    EXPECT_FALSE(m.retained);
    EXPECT_EQ(m.qos, 0);
    seen = true;
  }
  EXPECT_TRUE(seen);
}

TEST(SimSensorFeed, SwitchesReportStateWordsRetainedOnChange) {
  auto sim = make(testing::load_demo());
  std::vector<std::string> words;
  for (const auto& m : play(*sim, 2.5 * 3600.0)) {
    if (m.topic != "bldg/qf/l1-south-open/wet-switch") continue;
    EXPECT_TRUE(m.retained);
    EXPECT_EQ(m.qos, 1);
    const std::string w = nlohmann::json::parse(m.payload).at("value").get<std::string>();
    if (words.empty() || words.back() != w) words.push_back(w);
  }
  // Dry, wet from 08:00 to 08:12 (the scripted incident), dry again.
  EXPECT_EQ(words, (std::vector<std::string>{"dry", "wet", "dry"}));
}

TEST(SimSensorFeed, SilentHumiditySensorSendsNothingDuringItsIncident) {
  auto sim = make(testing::load_demo());
  const timestamp from = sim->script().at(6.5 * 3600.0), to = sim->script().at(6.75 * 3600.0);
  int inside = 0, outside = 0;
  for (const auto& m : play(*sim, 1.0 * 3600.0)) {
    if (m.topic != "bldg/qf/l3-north-open/rh") continue;
    const auto ts = parse_iso8601(nlohmann::json::parse(m.payload).at("ts").get<std::string>()).value();
    ++(ts >= from && ts < to ? inside : outside);
  }
  EXPECT_EQ(inside, 0);
  EXPECT_GE(outside, 90);  // 60 min less 15 silent, every 30 s
}

TEST(SimSensorFeed, SameSeedSameReadingsOtherSeedOtherNoise) {
  auto a = make(testing::load_demo(), 5), b = make(testing::load_demo(), 5), c = make(testing::load_demo(), 6);
  const auto ra = play(*a, 600.0), rb = play(*b, 600.0), rc = play(*c, 600.0);
  ASSERT_EQ(ra.size(), rb.size());
  for (std::size_t i = 0; i < ra.size(); ++i) {
    EXPECT_EQ(ra[i].topic, rb[i].topic);
    EXPECT_EQ(ra[i].payload, rb[i].payload);
  }
  int differ = 0;
  for (std::size_t i = 0; i < std::min(ra.size(), rc.size()); ++i) differ += ra[i].payload != rc[i].payload ? 1 : 0;
  EXPECT_GT(differ, 0);
}

TEST(SimSensorFeed, WallClockConfigWithoutFieldsGetsBareNumbers) {
  auto sim =
      make(testing::load_demo({{"clock:\n  source: readings", "clock:\n  source: wall"}, {", field: /value", ""}}));
  std::vector<outbound> out;
  sim->begin(out);
  ASSERT_FALSE(out.empty());
  for (const auto& m : out) {
    // The outdoor-air unit's own sensors take their `field` from the building file, not the config.
    if (m.topic.find("doas-roof/") != std::string::npos) continue;
    if (m.topic.find("wet-switch") != std::string::npos || m.topic.find("entrance-door") != std::string::npos) {
      EXPECT_TRUE(m.payload == "dry" || m.payload == "closed") << m.topic << " " << m.payload;
    } else {
      EXPECT_NE(m.payload.find_first_of("0123456789"), std::string::npos) << m.payload;
      EXPECT_EQ(m.payload.find('{'), std::string::npos) << m.payload;
    }
  }
}

TEST(SimSensorFeed, EventTimeNeedsAFieldForTheTime) {
  const auto loaded = testing::load_demo({{"bldg/qf/g-lobby/rh, field: /value", "bldg/qf/g-lobby/rh"}});
  ASSERT_TRUE(loaded.ok());
  const auto demo = testing::demo_scenario("short");
  auto created = simulation::create(*loaded.config, demo.house, demo.day, simulation_options{});
  ASSERT_FALSE(created.ok());
  EXPECT_EQ(created.err().message,
            "topic bldg/qf/g-lobby/rh: with clock source readings every input needs a field (the payload "
            "carries the time at /ts)");
}

TEST(SimSensorFeed, FractionHumidityIsSentAsFraction) {
  auto sim = make(
      testing::load_demo({{"bldg/qf/g-lobby/rh, field: /value", "bldg/qf/g-lobby/rh, field: /value, unit: fraction"}}));
  std::vector<outbound> out;
  sim->begin(out);
  for (const auto& m : out) {
    if (m.topic != "bldg/qf/g-lobby/rh") continue;
    const double v = nlohmann::json::parse(m.payload).at("value").get<double>();
    EXPECT_GT(v, 0.3);
    EXPECT_LT(v, 1.0);
  }
}

TEST(SimSensorFeed, StuckSensorRepeatsItsValueThenRecovers) {
  auto sim = make(testing::load_demo(), 1,
                  {sensor_incident(incident_kind::sensor_stuck, "g-meeting", sensor_input::surface, 6.25, 6.5, 21.0)});
  const auto values = values_on(play(*sim, 3600.0), "bldg/qf/g-meeting/surface-temp");
  int stuck = 0, live = 0;
  for (const auto& [t, v] : values) {
    if (t >= 6.25 * 3600 && t < 6.5 * 3600) {
      EXPECT_DOUBLE_EQ(v, 21.0) << t;
      ++stuck;
    } else if (v != 21.0) {
      ++live;
    }
  }
  EXPECT_EQ(stuck, 30);  // every 30 s for 15 min
  EXPECT_GE(live, 85);
}

TEST(SimSensorFeed, DriftingSensorReadsOffByItsRateTimesTheHours) {
  // The same seed with and without a humidity drift of -6 %RH/h from 06:00 to 07:00: the noise
  // stream is the same, so the difference is the drift itself (up to rounding to 0.1 %RH).
  const auto drift =
      sensor_incident(incident_kind::sensor_drift, "l2-north-offices", sensor_input::humidity, 6.0, 7.0, -6.0);
  auto plain = make(testing::load_demo(), 3), drifting = make(testing::load_demo(), 3, {drift});
  const auto a = values_on(play(*plain, 1.5 * 3600.0), "bldg/qf/l2-north-offices/rh");
  const auto b = values_on(play(*drifting, 1.5 * 3600.0), "bldg/qf/l2-north-offices/rh");
  ASSERT_EQ(a.size(), b.size());
  for (std::size_t i = 0; i < a.size(); ++i) {
    const double t = a[i].first;
    const double expected = t < 7.0 * 3600 ? -6.0 * (t - 6.0 * 3600) / 3600.0 : 0.0;
    EXPECT_NEAR(b[i].second - a[i].second, expected, 0.11) << t;
  }
}

TEST(SimSensorFeed, SensorIncidentOnOneTopicLeavesTheOthersAlone) {
  auto i = sensor_incident(incident_kind::sensor_silent, "ceiling-north", sensor_input::return_temp, 6.0, 7.0);
  i.topic = "plant/qf/ceiling-north/return-temp";
  auto sim = make(testing::load_demo(), 1, {i});
  const auto msgs = play(*sim, 3000.0);
  EXPECT_TRUE(values_on(msgs, "plant/qf/ceiling-north/return-temp").size() <= 1u);  // 06:00 is the start reading
  EXPECT_GE(values_on(msgs, "plant/qf/ceiling-north/supply-temp").size(), 600u);
}

TEST(SimSensorFeed, BrokerOutagePublishesNothingAndCountsWhatItSwallowed) {
  incident outage;
  outage.kind = incident_kind::broker_outage;
  outage.start_s = 6.25 * 3600;
  outage.end_s = 6.5 * 3600;
  auto sim = make(testing::load_demo(), 1, {outage});
  const auto msgs = play(*sim, 3600.0);
  for (const auto& [t, v] : values_on(msgs, "plant/qf/slab-lobby/supply-temp")) {
    EXPECT_FALSE(t >= 6.25 * 3600 && t < 6.5 * 3600) << t;
  }
  EXPECT_GT(sim->outage().readings_dropped, 15 * 60 / 5 * 3);  // at least the three supply sensors
  sim->on_message("plant/qf/slab-lobby/supply-sp/set", "21");  // after the outage: heard
  EXPECT_EQ(sim->outage().messages_missed, 0);
}

TEST(SimSensorFeed, DehumidifierFaultAndSupplyDewPointOnTheScenariosTopics) {
  const auto loaded = testing::load_demo();
  auto demo = testing::demo_scenario("short");
  input_config fault;
  fault.topic = "plant/qf/doas-roof/fault";
  fault.field = "/value";
  fault.active = {"fault"};
  input_config dew;
  dew.topic = "plant/qf/doas-roof/supply-dew-point";
  dew.field = "/value";
  demo.house.dehumidifiers[0].fault = fault;
  demo.house.dehumidifiers[0].supply_dew_point = dew;
  auto created = simulation::create(*loaded.config, demo.house, demo.day, simulation_options{});
  ASSERT_TRUE(created.ok()) << created.err().message;
  const auto msgs = play(*created.value(), 2.5 * 3600.0);
  std::vector<std::string> words;
  for (const auto& m : msgs) {
    if (m.topic != fault.topic) continue;
    EXPECT_TRUE(m.retained);
    const std::string w = nlohmann::json::parse(m.payload).at("value").get<std::string>();
    if (words.empty() || words.back() != w) words.push_back(w);
  }
  EXPECT_EQ(words, (std::vector<std::string>{"ok", "fault", "ok"}));  // the coil trips 07:00-07:45
  const auto dp = values_on(msgs, dew.topic);
  ASSERT_FALSE(dp.empty());
  for (const auto& [t, v] : dp) {
    if (t > 7.5 * 3600 && t < 7.75 * 3600) {
      EXPECT_GT(v, 21.0) << t;  // outdoor air passes the tripped coil
    }
    if (t > 6.75 * 3600 && t < 7.0 * 3600) {
      EXPECT_LT(v, 12.0) << t;  // the coil at its design 11 °C
    }
  }
}

}  // namespace
}  // namespace dewmargin::sim
