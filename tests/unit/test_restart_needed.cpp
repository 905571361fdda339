#include <gtest/gtest.h>

#include <functional>
#include <string>
#include <vector>

#include "dewmargin/restart_needed.h"

namespace dewmargin {
namespace {

input_config topic_input(const std::string& topic) {
  input_config c;
  c.topic = topic;
  return c;
}

site_config base_site() {
  site_config s;
  s.site = "s";
  s.broker.client_id = "gw1";
  s.broker.tls = tls_config{"ca.pem", "", ""};
  loop_config l;
  l.id = "loop-a";
  l.supply_temp = topic_input("plant/a/supply");
  s.loops.push_back(l);
  zone_config z;
  z.id = "z1";
  z.loop = "loop-a";
  z.air_temp = topic_input("b/z1/temp");
  z.humidity.push_back(topic_input("b/z1/rh"));
  s.zones.push_back(z);
  return s;
}

struct change_case {
  const char* name;
  std::function<void(site_config&)> change;
  std::vector<std::string> expected;
};

// What is read only at start (the connection, the history file, the topic tree, the
// clock) needs a restart; zones, loops, thresholds and rules take effect at once.
TEST(RestartNeeded, NamesEachSettingReadOnlyAtStart) {
  const std::vector<change_case> cases = {
      {"nothing", [](site_config&) {}, {}},
      {"broker uri", [](site_config& s) { s.broker.uri = "ssl://gw:8883"; }, {"broker.uri"}},
      {"client id", [](site_config& s) { s.broker.client_id = "gw2"; }, {"broker.client_id"}},
      {"username", [](site_config& s) { s.broker.username = "u"; }, {"broker.username"}},
      {"password file", [](site_config& s) { s.broker.password_file = "/run/pw"; }, {"broker.password_file"}},
      {"CA file", [](site_config& s) { s.broker.tls->ca_file = "new-ca.pem"; }, {"broker.tls.ca_file"}},
      {"client certificate", [](site_config& s) { s.broker.tls->cert_file = "c.pem"; }, {"broker.tls.cert_file"}},
      {"client key", [](site_config& s) { s.broker.tls->key_file = "k.pem"; }, {"broker.tls.key_file"}},
      {"TLS off", [](site_config& s) { s.broker.tls.reset(); }, {"broker.tls"}},
      {"keepalive", [](site_config& s) { s.broker.keepalive_s = 60; }, {"broker.keepalive_s"}},
      {"history path", [](site_config& s) { s.storage.path = "/tmp/h.db"; }, {"storage.path"}},
      {"event retention", [](site_config& s) { s.storage.keep_events_days = 30; }, {"storage.keep_events_days"}},
      {"sample retention", [](site_config& s) { s.storage.keep_samples_days = 30; }, {"storage.keep_samples_days"}},
      {"minute sample roll-up",
       [](site_config& s) { s.storage.keep_minute_samples_days = 7; },
       {"storage.keep_minute_samples_days"}},
      {"prefix", [](site_config& s) { s.publish.prefix = "dm2"; }, {"publish.prefix"}},
      {"clock source", [](site_config& s) { s.clock.source = clock_source::readings; }, {"clock.source"}},
      {"new zone input topic",
       [](site_config& s) { s.zones[0].surfaces.push_back(topic_input("b/z1/surface")); },
       {"input topic 'b/z1/surface' (new)"}},
      {"new loop input topic",
       [](site_config& s) { s.loops[0].flow = topic_input("plant/a/flow"); },
       {"input topic 'plant/a/flow' (new)"}},
      {"several, in config order",
       [](site_config& s) {
         s.publish.prefix = "dm2";
         s.broker.keepalive_s = 10;
         s.storage.path = "x.db";
       },
       {"broker.keepalive_s", "storage.path", "publish.prefix"}},
      {"http listen",
       [](site_config& s) {
         s.http = http_config{"127.0.0.1", 9090, ""};
       },
       {"http"}},
      // At once, no restart:
      {"thresholds", [](site_config& s) { s.zones[0].thresholds.margin_warn_k = 3.0; }, {}},
      {"publish interval", [](site_config& s) { s.publish.min_interval_s = 1; }, {}},
      {"logging level", [](site_config& s) { s.logging.level = "debug"; }, {}},
      {"clock field", [](site_config& s) { s.clock.field = "/time"; }, {}},
      {"a topic no longer read", [](site_config& s) { s.zones[0].humidity[0].topic = "b/z1/temp"; }, {}},
      {"a known topic read by another field", [](site_config& s) { s.zones[0].air_temp.field = "/t"; }, {}},
  };
  for (const auto& c : cases) {
    site_config fresh = base_site();
    c.change(fresh);
    EXPECT_EQ(restart_needed(base_site(), fresh), c.expected) << c.name;
  }
}

TEST(RestartNeeded, ReloadKeepsTheStartSettingsAndTakesTheRest) {
  site_config running = base_site();
  running.http = http_config{"127.0.0.1", 8088, ""};
  site_config fresh = base_site();
  fresh.broker.uri = "tcp://elsewhere:1883";
  fresh.broker.keepalive_s = 99;
  fresh.storage.path = "other.db";
  fresh.storage.keep_events_days = 1;
  fresh.publish.prefix = "other";
  fresh.publish.min_interval_s = 1;
  fresh.clock.source = clock_source::readings;
  fresh.clock.field = "/time";
  fresh.http.reset();
  fresh.zones[0].thresholds.margin_warn_k = 3.0;

  const site_config applied = with_start_settings_of(running, fresh);
  EXPECT_EQ(applied.broker.uri, running.broker.uri);
  EXPECT_EQ(applied.broker.keepalive_s, running.broker.keepalive_s);
  EXPECT_EQ(applied.storage.path, running.storage.path);
  EXPECT_EQ(applied.storage.keep_events_days, running.storage.keep_events_days);
  EXPECT_EQ(applied.publish.prefix, running.publish.prefix);
  EXPECT_EQ(applied.clock.source, running.clock.source);
  ASSERT_TRUE(applied.http.has_value());
  EXPECT_EQ(applied.http->port, 8088);
  // Everything else is the new file's.
  EXPECT_EQ(applied.publish.min_interval_s, 1);
  EXPECT_EQ(applied.clock.field, "/time");
  EXPECT_EQ(applied.zones[0].thresholds.margin_warn_k, 3.0);
  // Nothing that needs a restart is left different from what runs.
  EXPECT_TRUE(restart_needed(running, applied).empty());
}

TEST(RestartNeeded, ListsInputTopicsOnceInConfigOrder) {
  site_config s = base_site();
  s.loops[0].return_temp = topic_input("plant/a/return");
  s.zones[0].humidity.push_back(topic_input("b/z1/rh"));
  s.zones[0].condensation_switch = topic_input("b/z1/wet");
  s.zones[0].window_contact = topic_input("b/z1/window");
  EXPECT_EQ(input_topics(s), (std::vector<std::string>{"plant/a/supply", "plant/a/return", "b/z1/temp", "b/z1/rh",
                                                       "b/z1/wet", "b/z1/window"}));
  // A dehumidifier's own inputs (issue 10): a new one needs a restart like any input topic.
  dehumidifier_config d;
  d.id = "doas";
  d.fault = topic_input("plant/doas/fault");
  d.supply_dew_point = topic_input("plant/doas/supply-dp");
  s.dehumidifiers.push_back(d);
  const std::vector<std::string> topics = input_topics(s);
  ASSERT_EQ(topics.size(), 8u);
  EXPECT_EQ(topics[6], "plant/doas/fault");
  EXPECT_EQ(topics[7], "plant/doas/supply-dp");
}

}  // namespace
}  // namespace dewmargin
