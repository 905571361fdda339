// The simulator's sensors (tools/simulator/model/sensor_feed.h), read through the demo config.
#include <gtest/gtest.h>

#include <map>
#include <nlohmann/json.hpp>

#include "model/simulation.h"
#include "test_sim_helpers.h"

namespace dewmargin::sim {
namespace {

std::unique_ptr<simulation> make(const config_load_result& loaded, std::uint64_t seed = 1) {
  EXPECT_TRUE(loaded.ok()) << (loaded.errors.empty() ? "" : loaded.errors.front().to_string());
  simulation_options o;
  o.seed = seed;
  auto created = simulation::create(*loaded.config, quayside_four(), short_day(), o);
  EXPECT_TRUE(created.ok()) << created.err().message;
  return std::move(created.value());
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
  auto created = simulation::create(*loaded.config, quayside_four(), short_day(), simulation_options{});
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

}  // namespace
}  // namespace dewmargin::sim
