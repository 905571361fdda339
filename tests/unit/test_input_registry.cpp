// The input registry alone: when an input is awaiting, ok, bad, stale or missing, and the
// transitions it reports (input_registry.h states the rule).
#include <gtest/gtest.h>

#include <vector>

#include "dewmargin/input_registry.h"

namespace dewmargin {
namespace {

constexpr std::int64_t k_t0_ms = 1'800'000'000'000;
timestamp at_s(double s) { return from_unix_ms(k_t0_ms + static_cast<std::int64_t>(s * 1000.0)); }

input_config topic(const std::string& t) {
  input_config c;
  c.topic = t;
  return c;
}

struct registry_fixture {
  registry_fixture() {
    contact.active = {"open"};
    temp_id = reg.add(input_kind::air_temp, temp, {false, 0}, 180.0);
    contact_id = reg.add(input_kind::window_contact, contact, {false, 0}, 180.0);
  }
  std::vector<input_transition> apply(std::size_t id, const char* payload, double t_s) {
    std::vector<input_transition> changes;
    reg.apply(id, payload, at_s(t_s), at_s(t_s), plausibility_config{}, changes);
    return changes;
  }
  std::vector<input_transition> staleness(double t_s) {
    std::vector<input_transition> changes;
    reg.check_staleness(at_s(0), at_s(t_s), changes);
    return changes;
  }
  input_config temp = topic("b/temp");
  input_config contact = topic("b/window");
  input_registry reg;
  std::size_t temp_id = 0;
  std::size_t contact_id = 0;
};

TEST(InputRegistry, AwaitingUntilTheFirstReadingWhichIsNoTransition) {
  registry_fixture f;
  EXPECT_EQ(f.reg[f.temp_id].status, input_status::awaiting);
  EXPECT_TRUE(f.apply(f.temp_id, "24", 1).empty());
  EXPECT_EQ(f.reg[f.temp_id].status, input_status::ok);
  EXPECT_EQ(f.reg.fresh_value(f.temp_id, at_s(1)), 24.0);
  EXPECT_EQ(f.reg.counts().readings, 1u);
}

TEST(InputRegistry, StaleExactlyStaleAfterSecondsAfterTheLastGoodReading) {
  registry_fixture f;
  (void)f.apply(f.temp_id, "24", 10);
  EXPECT_TRUE(f.staleness(189.999).empty());
  EXPECT_EQ(f.reg.fresh_value(f.temp_id, at_s(189.999)), 24.0);
  const auto changes = f.staleness(190);
  ASSERT_EQ(changes.size(), 1u);
  EXPECT_EQ(changes[0].slot, f.temp_id);
  EXPECT_EQ(changes[0].from, input_status::ok);
  EXPECT_EQ(changes[0].to, input_status::stale);
  EXPECT_EQ(changes[0].reason, "no reading for 180 s");
  EXPECT_FALSE(f.reg.fresh_value(f.temp_id, at_s(190)));
  EXPECT_TRUE(f.staleness(500).empty()) << "stale once, not once per check";
  // Back: a transition to ok.
  const auto back = f.apply(f.temp_id, "24.5", 501);
  ASSERT_EQ(back.size(), 1u);
  EXPECT_EQ(back[0].from, input_status::stale);
  EXPECT_EQ(back[0].to, input_status::ok);
  EXPECT_FALSE(back[0].bad_messages);
}

TEST(InputRegistry, NeverReportedIsMissingStaleAfterSecondsAfterStart) {
  registry_fixture f;
  EXPECT_TRUE(f.staleness(179.9).empty());
  EXPECT_TRUE(f.reg[f.temp_id].awaited(179.9));
  const auto changes = f.staleness(180);
  ASSERT_EQ(changes.size(), 1u);
  EXPECT_EQ(changes[0].slot, f.temp_id);
  EXPECT_EQ(changes[0].from, input_status::awaiting);
  EXPECT_EQ(changes[0].to, input_status::missing);
  EXPECT_EQ(changes[0].reason, "no reading in the 180 s since start");
  EXPECT_FALSE(f.reg[f.temp_id].awaited(180));
}

TEST(InputRegistry, ANeverStaleMeasurementThatNeverReportsIsMissingOnceItsZoneStopsWaiting) {
  // stale_after_s: 0 means "never stale once it has reported", not "may stay silent for ever":
  // a zone must not stay unknown with no alarm because one of its sensors never spoke.
  registry_fixture f;
  input_config quiet = topic("b/quiet");
  quiet.stale_after_s = 0.0;
  const std::size_t id = f.reg.add(input_kind::humidity, quiet, {false, 0}, 180.0);
  EXPECT_EQ(f.reg[id].grace_s, 180.0);
  for (const auto& c : f.staleness(179.9)) EXPECT_NE(c.slot, id);
  bool missing = false;
  for (const auto& c : f.staleness(180)) {
    if (c.slot != id) continue;
    missing = true;
    EXPECT_EQ(c.to, input_status::missing);
    EXPECT_EQ(c.reason, "no reading in the 180 s since start");
  }
  EXPECT_TRUE(missing);
  EXPECT_TRUE(f.reg[id].faulted(at_s(181)));
  // Once it reports it is never stale again.
  (void)f.apply(id, "55", 200);
  EXPECT_EQ(f.reg[id].status, input_status::ok);
  for (const auto& c : f.staleness(30 * 86400.0)) EXPECT_NE(c.slot, id);
  // A zone whose own stale_after_s is 0 still waits only the default 180 s.
  const input_config other = topic("b/other");
  const std::size_t zero_zone = f.reg.add(input_kind::air_temp, other, {false, 1}, 0.0);
  EXPECT_EQ(f.reg[zero_zone].grace_s, 180.0);
}

TEST(InputRegistry, APayloadOverTheLimitIsABadInputNotRead) {
  registry_fixture f;
  (void)f.apply(f.temp_id, "24", 1);
  const std::string huge = "2" + std::string(k_max_input_payload_bytes, '0');
  const auto changes = f.apply(f.temp_id, huge.c_str(), 2);
  ASSERT_EQ(changes.size(), 1u);
  EXPECT_EQ(changes[0].to, input_status::bad);
  ASSERT_TRUE(changes[0].fault);
  EXPECT_EQ(*changes[0].fault, input_fault::too_large);
  EXPECT_EQ(f.reg.fresh_value(f.temp_id, at_s(2)), 24.0) << "the last good value stays";
}

TEST(InputRegistry, SwitchesAndContactsNeverGoStaleOrMissing) {
  registry_fixture f;
  // Never reported: not missing, whatever the time.
  for (double t : {180.0, 3600.0, 30 * 86400.0}) {
    for (const auto& c : f.staleness(t)) EXPECT_NE(c.slot, f.contact_id) << "at " << t << " s";
  }
  EXPECT_EQ(f.reg[f.contact_id].status, input_status::awaiting);
  EXPECT_EQ(f.reg[f.contact_id].stale_after_s, 0.0);
  // Reported once, then silent for a month: still ok and fresh, still open.
  (void)f.apply(f.contact_id, "open", 40 * 86400.0);
  for (const auto& c : f.staleness(70 * 86400.0)) EXPECT_NE(c.slot, f.contact_id);
  EXPECT_EQ(f.reg[f.contact_id].status, input_status::ok);
  EXPECT_TRUE(f.reg[f.contact_id].fresh(at_s(70 * 86400.0)));
  EXPECT_TRUE(f.reg[f.contact_id].active);
}

TEST(InputRegistry, ASwitchWithItsOwnStaleAfterGoesStale) {
  input_config wet = topic("b/wet");
  wet.active = {"1"};
  wet.stale_after_s = 600.0;
  input_registry reg;
  const auto id = reg.add(input_kind::condensation_switch, wet, {false, 0}, 180.0);
  std::vector<input_transition> changes;
  ASSERT_TRUE(reg.apply(id, "0", at_s(0), at_s(0), plausibility_config{}, changes));
  reg.check_staleness(at_s(0), at_s(599), changes);
  EXPECT_TRUE(changes.empty());
  reg.check_staleness(at_s(0), at_s(600), changes);
  ASSERT_EQ(changes.size(), 1u);
  EXPECT_EQ(changes[0].to, input_status::stale);
}

TEST(InputRegistry, BadButStillSendingStaysBad) {
  registry_fixture f;
  (void)f.apply(f.temp_id, "24", 0);
  const auto turned = f.apply(f.temp_id, "warm", 30);
  ASSERT_EQ(turned.size(), 1u);
  EXPECT_EQ(turned[0].to, input_status::bad);
  EXPECT_EQ(turned[0].fault, input_fault::not_a_number);
  // A bad payload every minute for an hour: bad all along, never stale.
  for (int minute = 1; minute <= 60; ++minute) {
    const double t = 30 + 60.0 * minute;
    EXPECT_TRUE(f.apply(f.temp_id, "warm", t).empty());
    EXPECT_TRUE(f.staleness(t + 59).empty()) << "minute " << minute;
    EXPECT_EQ(f.reg[f.temp_id].status, input_status::bad);
  }
  EXPECT_FALSE(f.reg.fresh_value(f.temp_id, at_s(3700))) << "the last good value is too old to use";
  // It stops sending: stale stale_after_s after its last message, with the count.
  const double last = 30 + 60.0 * 60;
  EXPECT_TRUE(f.staleness(last + 179).empty());
  const auto stale = f.staleness(last + 180);
  ASSERT_EQ(stale.size(), 1u);
  EXPECT_EQ(stale[0].from, input_status::bad);
  EXPECT_EQ(stale[0].to, input_status::stale);
  EXPECT_EQ(stale[0].bad_messages, 61u);
}

TEST(InputRegistry, OneTransitionPerKindOfFaultWhileBad) {
  registry_fixture f;
  (void)f.apply(f.temp_id, "24", 0);
  std::size_t transitions = 0;
  for (int i = 0; i < 1000; ++i) {
    transitions += f.apply(f.temp_id, i % 2 ? "warm" : std::to_string(100 + i).c_str(), 1 + i).size();
  }
  EXPECT_EQ(transitions, 2u);  // out_of_range, then not_a_number
  EXPECT_EQ(f.reg.counts().bad_readings, 1000u);
  EXPECT_EQ(f.reg.counts().suppressed_transitions, 998u);
  EXPECT_EQ(f.reg.fresh_value(f.temp_id, at_s(100)), 24.0) << "the last good value stays in use";
  const auto back = f.apply(f.temp_id, "24.5", 1001);
  ASSERT_EQ(back.size(), 1u);
  EXPECT_EQ(back[0].from, input_status::bad);
  EXPECT_EQ(back[0].bad_messages, 1000u);
}

TEST(InputRegistry, AdoptTakesReadingsAndStatesByTopicAndField) {
  registry_fixture old;
  (void)old.apply(old.temp_id, "24", 0);
  (void)old.apply(old.contact_id, "open", 0);
  (void)old.apply(old.temp_id, "warm", 5);
  registry_fixture fresh;
  fresh.reg.adopt(old.reg);
  EXPECT_EQ(fresh.reg[fresh.temp_id].status, input_status::bad);
  EXPECT_EQ(fresh.reg[fresh.temp_id].fault, input_fault::not_a_number);
  EXPECT_EQ(fresh.reg.fresh_value(fresh.temp_id, at_s(6)), 24.0);
  EXPECT_TRUE(fresh.reg[fresh.contact_id].active);
  // The same bad payload again is no new transition after the reload.
  EXPECT_TRUE(fresh.apply(fresh.temp_id, "warm", 7).empty());
}

TEST(InputRegistry, AReloadThatChangesASwitchsWordsDecodesItsLastPayloadAgain) {
  // A switch reports only on change: the state decoded with the old words must not outlive them.
  input_config wet_old = topic("b/wet");
  wet_old.active = {"1"};
  input_registry before;
  const std::size_t id = before.add(input_kind::condensation_switch, wet_old, {false, 0}, 180.0);
  std::vector<input_transition> changes;
  ASSERT_TRUE(before.apply(id, "1", at_s(1), at_s(1), plausibility_config{}, changes));
  ASSERT_TRUE(before[id].active);

  input_config inverted = topic("b/wet");  // the switch was wired inverted: fixed by a reload
  inverted.active = {"0"};
  inverted.inactive = {"1"};
  input_registry after;
  (void)after.add(input_kind::condensation_switch, inverted, {false, 0}, 180.0);
  after.adopt(before);
  EXPECT_FALSE(after[id].active);
  EXPECT_EQ(after[id].status, input_status::ok);

  input_config other_words = topic("b/wet");  // words that do not know "1": bad, last state kept
  other_words.active = {"wet"};
  other_words.inactive = {"dry"};
  input_registry unknown;
  (void)unknown.add(input_kind::condensation_switch, other_words, {false, 0}, 180.0);
  unknown.adopt(before);
  EXPECT_TRUE(unknown[id].active);
  EXPECT_EQ(unknown[id].status, input_status::bad);
  EXPECT_EQ(unknown[id].fault, input_fault::unknown_word);
}

TEST(InputRegistry, TopicsAreSortedAndUnique) {
  input_config a = topic("b/env");
  a.field = "/t";
  input_config b = topic("b/env");
  b.field = "/rh";
  input_config c = topic("a/supply");
  input_registry reg;
  (void)reg.add(input_kind::air_temp, a, {false, 0}, 180);
  (void)reg.add(input_kind::humidity, b, {false, 0}, 180);
  (void)reg.add(input_kind::supply_temp, c, {true, 0}, 180);
  input_config d = topic("b/env");  // a third field of b/env, added after another topic
  d.field = "/surface";
  (void)reg.add(input_kind::surface, d, {false, 1}, 180);
  EXPECT_EQ(reg.topics(), (std::vector<std::string>{"a/supply", "b/env"}));
  std::vector<std::size_t> ids{99};
  ASSERT_TRUE(reg.slots_for("b/env", ids));
  EXPECT_EQ(ids, (std::vector<std::size_t>{0, 1, 3}));  // in the order they were added
  ASSERT_TRUE(reg.slots_for("a/supply", ids));
  EXPECT_EQ(ids, (std::vector<std::size_t>{2}));
  EXPECT_TRUE(reg.reads("b/env"));
  EXPECT_FALSE(reg.slots_for("nowhere", ids));
  EXPECT_TRUE(ids.empty());
  EXPECT_FALSE(reg.reads("nowhere"));
}

}  // namespace
}  // namespace dewmargin
