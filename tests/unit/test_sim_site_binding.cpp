// Config and simulated building must describe one plant (tools/simulator/model/site_binding.h).
#include <gtest/gtest.h>

#include "model/site_binding.h"
#include "test_sim_helpers.h"

namespace dewmargin::sim {
namespace {

TEST(SimSiteBinding, DemoConfigBindsAndListsEveryCommandTopic) {
  const auto loaded = testing::load_demo();
  ASSERT_TRUE(loaded.ok());
  const auto bound = site_binding::bind(*loaded.config, testing::demo_scenario("short").house);
  ASSERT_TRUE(bound.ok()) << bound.err().message;
  // 10 valves, 3 setpoints, 1 dew-point request.
  EXPECT_EQ(bound.value().command_topics().size(), 14u);
  EXPECT_TRUE(bound.value().is_command_topic("plant/qf/doas-roof/dewpoint-sp/set"));
  EXPECT_FALSE(bound.value().is_command_topic("bldg/qf/g-lobby/rh"));
}

TEST(SimSiteBinding, MismatchesAreAllNamed) {
  struct bad_case {
    const char* name;
    std::vector<std::pair<std::string, std::string>> edits;
    const char* message;
  };
  const std::vector<bad_case> cases = {
      {"zone renamed",
       {{"g-meeting", "g-meet"}},
       "zone g-meeting of building quayside-four is not in the config; config zone g-meet is not in building "
       "quayside-four"},
      {"zone on another loop",
       {{"    loop: slab-lobby", "    loop: ceiling-north"}},
       "zone g-lobby is on loop ceiling-north in the config but on slab-lobby in the building"},
      {"dehumidifier renamed",
       {{"id: doas-roof", "id: doas-east"}},
       "dehumidifier doas-roof of building quayside-four is not in the config; config dehumidifier doas-east is not "
       "in building quayside-four"},
  };
  for (const auto& c : cases) {
    SCOPED_TRACE(c.name);
    const auto loaded = testing::load_demo(c.edits);
    ASSERT_TRUE(loaded.ok()) << loaded.errors.front().to_string();
    const auto bound = site_binding::bind(*loaded.config, testing::demo_scenario("short").house);
    ASSERT_FALSE(bound.ok());
    EXPECT_EQ(bound.err().code, error_code::invalid_argument);
    EXPECT_EQ(bound.err().message, c.message);
  }
}

TEST(SimSiteBinding, DecodesPlantCommandsAndNamesBadOnes) {
  const auto loaded = testing::load_demo();
  ASSERT_TRUE(loaded.ok());
  const auto bound = site_binding::bind(*loaded.config, testing::demo_scenario("short").house);
  ASSERT_TRUE(bound.ok());
  const site_binding& b = bound.value();

  const auto closed = b.decode("bldg/qf/l2-south-meeting/valve/set", "closed");
  ASSERT_TRUE(closed.ok());
  EXPECT_EQ(closed.value().target, command_target::valve);
  EXPECT_EQ(closed.value().index, 6u);  // seventh zone of the building
  EXPECT_FALSE(closed.value().open);
  EXPECT_TRUE(b.decode("bldg/qf/l2-south-meeting/valve/set", "open").value().open);

  const auto sp = b.decode("plant/qf/slab-lobby/supply-sp/set", "21.5");
  ASSERT_TRUE(sp.ok());
  EXPECT_EQ(sp.value().target, command_target::setpoint);
  EXPECT_EQ(sp.value().index, 2u);
  EXPECT_DOUBLE_EQ(sp.value().value_c, 21.5);

  const auto req = b.decode("plant/qf/doas-roof/dewpoint-sp/set", " 10.3\n");
  ASSERT_TRUE(req.ok());
  EXPECT_EQ(req.value().target, command_target::dew_point_request);
  EXPECT_DOUBLE_EQ(req.value().value_c, 10.3);

  struct bad {
    const char* topic;
    const char* payload;
    const char* message;
  };
  for (const bad& c : {bad{"bldg/qf/g-lobby/valve/set", "half",
                           "bldg/qf/g-lobby/valve/set: valve command 'half' is "
                           "neither 'open' nor 'closed'"},
                       bad{"plant/qf/slab-lobby/supply-sp/set", "warm",
                           "plant/qf/slab-lobby/supply-sp/set: 'warm' is "
                           "not a temperature"},
                       bad{"plant/qf/slab-lobby/supply-sp/set", "",
                           "plant/qf/slab-lobby/supply-sp/set: '' is not a "
                           "temperature"},
                       bad{"bldg/qf/g-lobby/rh", "50", "bldg/qf/g-lobby/rh: not a plant command topic"}}) {
    const auto r = b.decode(c.topic, c.payload);
    ASSERT_FALSE(r.ok()) << c.topic << " " << c.payload;
    EXPECT_EQ(r.err().message, c.message);
  }
}

}  // namespace
}  // namespace dewmargin::sim
