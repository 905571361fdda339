// engine::republish, what the service calls after a reconnect (the broker may have restarted
// without persistence and forgotten every retained message): each retained topic the engine
// has published goes out again, commands with what the plant was last told, states as they
// stand now.
#include <gtest/gtest.h>

#include <map>
#include <set>
#include <string>

#include "engine_fixture.h"

namespace dewmargin {
namespace {

using testing_support::engine_driver;
using testing_support::published;
using testing_support::rh_for;
using testing_support::small_site;

std::map<std::string, published> last_retained(const std::vector<published>& log) {
  std::map<std::string, published> last;
  for (const auto& p : log) {
    if (p.retained) last.insert_or_assign(p.topic, p);
  }
  return last;
}

TEST(EngineRepublish, EveryRetainedTopicGoesOutAgainWithTheLastCommands) {
  site_config cfg = small_site();
  // A unit with an input of its own publishes a state too.
  cfg.dehumidifiers[0].fault = testing_support::topic_input("plant/doas/fault");
  engine_driver d(cfg);
  // z1 tight (dew point 15.5 °C, surface 17 °C): the water is reset, the unit asked for drier
  // air, the valves opened (supply 17 °C).
  for (int i = 0; i < 60; ++i) {
    d.readings(24, rh_for(24, 15.5), 17, 17);
    d.advance(10);
  }
  d.send("plant/doas/fault", "0");
  d.advance(2);
  const auto before = last_retained(d.log());
  for (const char* topic : {"dm/zone/z1/state", "dm/zone/z2/state", "dm/loop/loop-a/state", "b/z1/valve", "b/z2/valve",
                            "plant/a/sp", "plant/doas/dp", "dm/dehumidifier/doas-1/state"}) {
    ASSERT_EQ(before.count(topic), 1u) << topic << " was never published: the test would prove nothing";
  }

  d.clear_log();
  d.republish();
  const auto again = last_retained(d.log());
  std::set<std::string> before_topics, again_topics;
  for (const auto& [t, p] : before) before_topics.insert(t);
  for (const auto& [t, p] : again) again_topics.insert(t);
  EXPECT_EQ(again_topics, before_topics);
  for (const auto& [topic, p] : again) {
    if (p.cls == message_class::command) {
      EXPECT_EQ(p.payload, before.at(topic).payload) << topic;
    } else {
      EXPECT_EQ(p.cls, message_class::state) << topic;
      const auto now_json = p.json();
      const auto then = before.at(topic).json();
      ASSERT_TRUE(now_json.is_object()) << topic;
      for (const char* key : {"band", "margin_k", "valve", "setpoint_c", "fault"}) {
        EXPECT_EQ(now_json.value(key, nlohmann::json()), then.value(key, nlohmann::json())) << topic << " " << key;
      }
    }
  }
  // Nothing but retained messages: no event is made up by a reconnect. The plant's commands
  // first: a valve's close must not wait behind every state in the outbox.
  bool state_seen = false;
  for (const auto& p : d.log()) {
    EXPECT_TRUE(p.retained) << p.topic << " " << p.payload;
    if (p.cls == message_class::state) state_seen = true;
    if (p.cls == message_class::command) {
      EXPECT_FALSE(state_seen) << p.topic << " comes after a state";
    }
  }
  EXPECT_EQ(d.last_json("dm/zone/z1/state")["band"], "tight");
}

TEST(EngineRepublish, ARepublishRightAfterTheStartSendsTheStartingStates) {
  engine_driver d(small_site());
  const auto at_start = last_retained(d.log());
  d.clear_log();
  d.republish();
  const auto again = last_retained(d.log());
  ASSERT_FALSE(again.empty());
  for (const auto& [topic, p] : at_start) {
    ASSERT_EQ(again.count(topic), 1u) << topic;
    EXPECT_EQ(again.at(topic).payload, p.payload) << topic;  // same instant, same state
  }
}

// After a reload that moved the setpoint to another topic, the old topic is not the plant's
// any more: only the new config's topics come back.
TEST(EngineRepublish, AfterAReloadOnlyTheNewConfigsTopicsComeBack) {
  engine_driver d(small_site());
  for (int i = 0; i < 6; ++i) {
    d.readings(24, 50, 17, 17);
    d.advance(10);
  }
  ASSERT_FALSE(d.on_topic("plant/a/sp").empty());
  site_config moved = small_site();
  moved.loops[0].setpoint.topic = "plant/a/sp2";
  d.reload(moved);
  d.clear_log();
  d.republish();
  EXPECT_TRUE(d.on_topic("plant/a/sp").empty());
  ASSERT_EQ(d.on_topic("plant/a/sp2").size(), 1u);
  EXPECT_TRUE(d.on_topic("plant/a/sp2")[0].retained);
}

}  // namespace
}  // namespace dewmargin
