// The simulated building with and without supervision, closed through the decision core in
// lockstep (deterministic). The end-to-end test (tests/e2e) repeats this with the real
// dewmargind and a broker.
#include <gtest/gtest.h>

#include <cstdlib>
#include <iostream>

#include "model/report.h"
#include "test_sim_helpers.h"

namespace dewmargin::sim {
namespace {

site_config demo_config() {
  auto loaded = testing::load_demo();
  EXPECT_TRUE(loaded.ok()) << (loaded.errors.empty() ? "" : loaded.errors.front().to_string());
  return *loaded.config;
}

std::unique_ptr<simulation> make(const scenario& s, bool with_service) {
  simulation_options o;
  o.with_service = with_service;
  auto created = simulation::create(demo_config(), quayside_four(), s, o);
  EXPECT_TRUE(created.ok()) << created.err().message;
  return std::move(created.value());
}

void show(const simulation& sim) {
  if (std::getenv("DEWMARGIN_SIM_VERBOSE")) std::cout << summary_text(sim);
}

struct day_case {
  const char* name;
  scenario (*script)();
  double baseline_at_least_zone_min;
  double supervised_at_most_zone_min;
};

TEST(SimClosedLoop, SupervisionKeepsSurfacesDryWhereTheBaselineCondenses) {
  for (const day_case& c : {day_case{"short", &short_day, 200.0, 10.0}}) {
    SCOPED_TRACE(c.name);
    auto baseline = make(c.script(), false);
    std::vector<outbound> ignored;
    baseline->begin(ignored);
    while (!baseline->done()) baseline->advance(ignored);
    show(*baseline);

    auto supervised = make(c.script(), true);
    testing::run_through_core(*supervised, demo_config());
    show(*supervised);

    EXPECT_GE(baseline->truth().total_condensing_min(), c.baseline_at_least_zone_min);
    EXPECT_LE(supervised->truth().total_condensing_min(), c.supervised_at_most_zone_min);
    EXPECT_LE(supervised->truth().total_condensing_min(), 0.05 * baseline->truth().total_condensing_min());
    EXPECT_GT(supervised->watch().tally().alarms_raised, 0);
    EXPECT_EQ(supervised->watch().tally().acknowledged, supervised->watch().tally().acks_sent);
    EXPECT_EQ(supervised->commands().bad_commands, 0) << supervised->commands().last_bad_command;
  }
}

}  // namespace
}  // namespace dewmargin::sim
