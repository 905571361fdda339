#include <gtest/gtest.h>

#include <string>
#include <vector>

#include "dewmargin/dehumidifier_fault.h"

namespace dewmargin {
namespace {

const timestamp k_t0 = from_unix_ms(1'784'030'400'000);  // 2026-07-14T12:00:00Z
timestamp at_s(std::int64_t s) { return k_t0 + std::chrono::seconds(s); }

// Suppression by design of ANSI/ISA-18.2 (the unit's fault is the root cause of its zones'
// alarms); fault_k 2 K and fault_after_s 600 are this project's documented defaults.
struct fault_case {
  const char* name;
  unit_fault_inputs in;
  std::int64_t held_s;  // how long the inputs have stood
  bool fault;
  std::string reason;
};

TEST(DehumidifierFault, TheSwitchOrAMeasuredDewPointFarAboveTheRequest) {
  const std::vector<fault_case> cases = {
      {"all well", {false, 11.2, 11.0}, 3600, false, ""},
      {"switch active", {true, std::nullopt, std::nullopt}, 0, true, "fault switch active"},
      {"2.5 K high, not yet 600 s", {false, 13.5, 11.0}, 599, false, ""},
      {"2.5 K high for 600 s",
       {false, 13.5, 11.0},
       600,
       true,
       "supply dew point 13.5 °C above the request 11.0 °C + 2.0 K for 600 s"},
      {"exactly fault_k high", {false, 13.0, 11.0}, 3600, false, ""},
      {"no measurement", {false, std::nullopt, 11.0}, 3600, false, ""},
      {"no request yet", {false, 16.0, std::nullopt}, 3600, false, ""},
  };
  for (const auto& c : cases) {
    dehumidifier_fault f(2.0, 600.0);
    f.update(c.in, k_t0);
    f.update(c.in, at_s(c.held_s));
    EXPECT_EQ(f.fault(), c.fault) << c.name;
    EXPECT_EQ(f.reason(), c.reason) << c.name;
  }
}

TEST(DehumidifierFault, ClearsAtOnceAndTheTimerStartsAgain) {
  dehumidifier_fault f(2.0, 600.0);
  const unit_fault_inputs high{false, 14.0, 11.0};
  const unit_fault_inputs well{false, 11.5, 11.0};
  EXPECT_FALSE(f.update(high, k_t0));
  EXPECT_TRUE(f.update(high, at_s(600))) << "a change of fault state";
  EXPECT_FALSE(f.update(high, at_s(630))) << "no change";
  EXPECT_TRUE(f.update(well, at_s(660)));
  EXPECT_FALSE(f.fault());
  EXPECT_FALSE(f.update(high, at_s(700)));
  EXPECT_FALSE(f.update(high, at_s(1299))) << "600 s from 700 s, not from 0 s";
  EXPECT_TRUE(f.update(high, at_s(1300)));
}

}  // namespace
}  // namespace dewmargin
