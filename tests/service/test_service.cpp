// dewmargind on a real broker: what a subscriber sees, what the history keeps, and how the
// service starts, stops, restarts and reloads. Every wait is bounded.
#include <gtest/gtest.h>
#include <signal.h>

#include <thread>

#include "service_fixture.h"

namespace dewmargin::test_support {
namespace {

using namespace std::chrono_literals;

class Service : public ::testing::Test {
 protected:
  void SetUp() override {
    broker_.start();
    service_ = std::make_unique<service_under_test>(broker_.uri(), dir_.path());
    watcher_ =
        std::make_unique<mqtt_test_client>(broker_.uri(), std::vector<std::string>{"dm/#", "plant/#", "r/a/valve"});
  }
  void TearDown() override {
    if (HasFailure()) std::cerr << "---- dewmargind log\n" << service_->log_text() << "----\n";
  }

  // Starts the service and waits until it says online (retained status).
  void start_service() {
    const std::size_t from = watcher_->size();
    service_->start();
    ASSERT_TRUE(watcher_->wait_for(
        "dm/status", [](const received_message& m) { return as_json(m).value("state", "") == "online"; }, 10s, from))
        << "no online status";
  }

  void publish_readings(double surface_c, double rh_pct = 50.0) {
    watcher_->publish("plant/l1/supply", "16.0");
    watcher_->publish("r/a/surface", std::to_string(surface_c));
    watcher_->publish("r/a/temp", "24.0");
    watcher_->publish("r/a/rh", std::to_string(rh_pct));
    watcher_->publish("r/b/env", R"({"t": 23.5, "rh": 45})");
  }

  std::optional<nlohmann::json> wait_zone_state(const std::string& zone, const std::string& band,
                                                std::size_t from = 0) {
    const auto m = watcher_->wait_for(
        "dm/zone/" + zone + "/state", [&](const received_message& r) { return as_json(r).value("band", "") == band; },
        10s, from);
    if (!m) return std::nullopt;
    return as_json(*m);
  }

  temp_dir dir_{"dewmargin-service"};
  mosquitto_broker broker_;
  std::unique_ptr<service_under_test> service_;
  std::unique_ptr<mqtt_test_client> watcher_;
};

TEST_F(Service, PublishesRetainedZoneAndLoopStateAndTheBareSetpoint) {
  start_service();
  publish_readings(17.5);
  const auto zone = wait_zone_state("room-a", "safe");
  ASSERT_TRUE(zone);
  EXPECT_NEAR((*zone)["dew_point_c"].get<double>(), 12.93, 0.01);  // Magnus (WMO-No. 8) at 24 °C, 50 %
  EXPECT_NEAR((*zone)["margin_k"].get<double>(), 17.5 - 12.93, 0.01);
  EXPECT_EQ((*zone)["site"], "service-test");
  ASSERT_TRUE(watcher_->wait_for_payload("r/a/valve", "open", 10s));
  ASSERT_TRUE(watcher_->wait_for(
      "plant/l1/sp", [](const received_message&) { return true; }, 10s));
  ASSERT_TRUE(watcher_->wait_for(
      "dm/loop/loop-1/state", [](const received_message& m) { return as_json(m)["setpoint_c"].is_number(); }, 10s));
  // A client that connects later gets the retained states.
  mqtt_test_client late(broker_.uri(), {"dm/zone/room-a/state", "dm/loop/loop-1/state", "plant/l1/sp"});
  const auto retained = late.wait_for(
      "dm/zone/room-a/state", [](const received_message& m) { return m.retained; }, 10s);
  ASSERT_TRUE(retained);
  EXPECT_EQ(as_json(*retained)["band"], "safe");
  EXPECT_TRUE(late.wait_for(
      "plant/l1/sp", [](const received_message& m) { return m.retained; }, 10s));
  EXPECT_TRUE(late.wait_for(
      "dm/loop/loop-1/state", [](const received_message& m) { return m.retained; }, 10s));
}

// A broker restarted without persistence has forgotten every retained message: after it
// reconnects, the service publishes its states and plant commands again, as they stand now.
TEST_F(Service, RepublishesStatesAndCommandsAfterTheBrokerLostThem) {
  start_service();
  publish_readings(17.5);
  ASSERT_TRUE(wait_zone_state("room-a", "safe"));
  ASSERT_TRUE(watcher_->wait_for_payload("r/a/valve", "open", 10s));
  ASSERT_TRUE(watcher_->wait_for(
      "plant/l1/sp", [](const received_message&) { return true; }, 10s));

  // A retained message of the test's own shows that the restarted broker forgot them all
  // (the service's may already be back: it reconnects a second after the loss).
  watcher_->publish("probe/retained", "before-restart", true);
  {
    mqtt_test_client reader(broker_.uri(), {"probe/#"});
    ASSERT_TRUE(reader.wait_for_payload("probe/retained", "before-restart", 5s));
  }
  broker_.stop();
  broker_.start();
  {
    mqtt_test_client empty(broker_.uri(), {"probe/#"});
    EXPECT_FALSE(empty.wait_for_payload("probe/retained", "before-restart", 300ms)) << "the broker really forgot";
  }
  const auto until = std::chrono::steady_clock::now() + 30s;
  const auto retained = [&](const std::string& topic, const std::string& payload) {
    // A new subscriber each try: a retained message is what a subscription gets at once.
    do {
      mqtt_test_client probe(broker_.uri(), {topic});
      const auto m = probe.wait_for(
          topic, [](const received_message& r) { return r.retained; }, 1s);
      if (m && (payload.empty() || m->payload == payload)) return true;
    } while (std::chrono::steady_clock::now() < until);
    return false;
  };
  EXPECT_TRUE(retained("r/a/valve", "open"));
  EXPECT_TRUE(retained("plant/l1/sp", ""));  // the setpoint as it stands then (it ramps meanwhile)
  EXPECT_TRUE(retained("dm/loop/loop-1/state", ""));
  ASSERT_TRUE(retained("dm/zone/room-a/state", ""));
  mqtt_test_client reader(broker_.uri(), {"dm/zone/room-a/state"});
  const auto zone = reader.wait_for(
      "dm/zone/room-a/state", [](const received_message& r) { return r.retained; }, 5s);
  ASSERT_TRUE(zone);
  EXPECT_EQ(as_json(*zone)["band"], "safe");
  EXPECT_NE(service_->log_text().find("retained states and commands published again"), std::string::npos);
}

TEST_F(Service, CondensingReadingClosesTheValveAndRaisesABandEventWithinOneSecond) {
  start_service();
  publish_readings(17.5);
  ASSERT_TRUE(watcher_->wait_for_payload("r/a/valve", "open", 10s));
  const std::size_t from = watcher_->size();
  const auto sent = std::chrono::steady_clock::now();
  watcher_->publish("r/a/surface", "12.5");
  const auto band = wait_event(*watcher_, "band", "room-a", 5s, from);
  const auto valve = watcher_->wait_for_payload("r/a/valve", "closed", 5s, from);
  const auto elapsed = std::chrono::steady_clock::now() - sent;
  ASSERT_TRUE(band);
  ASSERT_TRUE(valve);
  EXPECT_EQ((*band)["to"], "condensing");
  EXPECT_EQ((*band)["alarm"]["active"], true);
  EXPECT_LT(elapsed, 1s);
}

// One invalid UTF-8 byte made the core throw and stopped the service (issue 8). Whether the
// core refuses it or the service contains the fault, supervision must go on.
TEST_F(Service, OneInvalidUtf8ByteInASensorPayloadDoesNotStopSupervision) {
  start_service();
  publish_readings(17.5);
  ASSERT_TRUE(wait_zone_state("room-a", "safe"));
  for (int i = 0; i < 3; ++i) watcher_->publish("r/a/temp", std::string("\x80", 1));
  const std::size_t from = watcher_->size();
  watcher_->publish("r/a/surface", "12.5");
  ASSERT_TRUE(wait_event(*watcher_, "band", "room-a", 5s, from)) << "the next reading was not handled";
  EXPECT_TRUE(service_->running());
}

TEST_F(Service, AcknowledgementUpdatesStateAndIsKeptInTheHistory) {
  start_service();
  publish_readings(12.5);
  ASSERT_TRUE(wait_zone_state("room-a", "condensing"));
  const std::size_t from = watcher_->size();
  watcher_->publish("dm/cmd/ack", R"({"zone":"room-a","by":"tj","note":"towel on the sill"})");
  const auto ack = wait_event(*watcher_, "ack", "room-a", 5s, from);
  ASSERT_TRUE(ack);
  EXPECT_EQ((*ack)["by"], "tj");
  const auto state = watcher_->wait_for(
      "dm/zone/room-a/state", [](const received_message& m) { return as_json(m)["alarm"]["acknowledged"] == true; }, 5s,
      from);
  ASSERT_TRUE(state);
  EXPECT_EQ(as_json(*state)["alarm"]["active"], true);

  EXPECT_EQ(service_->stop(), 0);
  const auto csv = run_dewmargin({"history", "--db", service_->db_path().string(), "--format", "csv"}, dir_.path());
  EXPECT_EQ(csv.exit_code, 0) << csv.out;
  EXPECT_EQ(csv.out.rfind("ts,subject_type,subject,kind,from,to,details\r\n", 0), 0u) << csv.out;
  EXPECT_NE(csv.out.find(",zone,room-a,ack,unacknowledged,acknowledged,"), std::string::npos) << csv.out;
  EXPECT_NE(csv.out.find(",zone,room-a,band,"), std::string::npos) << csv.out;
  EXPECT_NE(csv.out.find(",site,,service,stopped,running,"), std::string::npos) << csv.out;
  EXPECT_NE(csv.out.find(",site,,service,running,stopped,"), std::string::npos) << csv.out;
}

TEST_F(Service, BadCommandIsRejectedAndChangesNothing) {
  start_service();
  publish_readings(17.5);
  ASSERT_TRUE(wait_zone_state("room-a", "safe"));
  const std::size_t from = watcher_->size();
  watcher_->publish("dm/cmd/shelve", R"({"zone":"room-a","by":"tj","minutes":5000})");
  const auto rejected = wait_event(*watcher_, "rejected", "room-a", 5s, from);
  ASSERT_TRUE(rejected);
  EXPECT_EQ((*rejected)["reason"], "'minutes' must be a whole number from 1 to 1440 (got 5000)");
  EXPECT_FALSE(wait_event(*watcher_, "shelve", "room-a", 500ms, from));
}

TEST_F(Service, RestartRestoresAcknowledgementShelvingAndSetpoint) {
  start_service();
  publish_readings(12.5);
  ASSERT_TRUE(wait_zone_state("room-a", "condensing"));
  std::size_t from = watcher_->size();
  watcher_->publish("dm/cmd/ack", R"({"zone":"room-a","by":"tj"})");
  watcher_->publish("dm/cmd/shelve", R"({"zone":"room-b","by":"tj","minutes":30,"reason":"sensor swap"})");
  ASSERT_TRUE(wait_event(*watcher_, "shelve", "room-b", 5s, from));
  const auto loop = watcher_->wait_for(
      "dm/loop/loop-1/state", [](const received_message&) { return true; }, 5s);
  ASSERT_TRUE(loop);
  EXPECT_EQ(service_->stop(), 0);

  // A fresh subscriber after the restart sees the restored state before any reading.
  from = watcher_->size();
  start_service();
  const auto a = watcher_->wait_for(
      "dm/zone/room-a/state", [](const received_message&) { return true; }, 10s, from);
  const auto b = watcher_->wait_for(
      "dm/zone/room-b/state", [](const received_message&) { return true; }, 10s, from);
  const auto l = watcher_->wait_for(
      "dm/loop/loop-1/state", [](const received_message&) { return true; }, 10s, from);
  ASSERT_TRUE(a && b && l);
  EXPECT_EQ(as_json(*a)["alarm"]["active"], true);
  EXPECT_EQ(as_json(*a)["alarm"]["acknowledged"], true);
  EXPECT_EQ(as_json(*a)["valve"], "closed");
  EXPECT_TRUE(as_json(*b)["alarm"]["shelved_until"].is_string());
  EXPECT_EQ(as_json(*l)["setpoint_c"], as_json(*loop)["setpoint_c"]);
}

TEST_F(Service, LastWillMarksTheServiceOfflineWhenKilled) {
  start_service();
  const std::size_t from = watcher_->size();
  service_->kill_now();
  const auto offline = watcher_->wait_for(
      "dm/status", [](const received_message& m) { return as_json(m).value("state", "") == "offline"; }, 30s, from);
  ASSERT_TRUE(offline);
  EXPECT_EQ(as_json(*offline)["reason"], "connection lost");
  mqtt_test_client late(broker_.uri(), {"dm/status"});
  const auto retained = late.wait_for(
      "dm/status", [](const received_message& m) { return m.retained; }, 10s);
  ASSERT_TRUE(retained);
  EXPECT_EQ(as_json(*retained)["state"], "offline");
}

TEST_F(Service, SigtermStopsWithinFiveSecondsAndPublishesTheFinalStatus) {
  start_service();
  publish_readings(17.5);
  ASSERT_TRUE(wait_zone_state("room-a", "safe"));
  const std::size_t from = watcher_->size();
  const auto t0 = std::chrono::steady_clock::now();
  EXPECT_EQ(service_->stop(6s), 0);
  EXPECT_LT(std::chrono::steady_clock::now() - t0, 5s);
  const auto status = watcher_->wait_for(
      "dm/status", [](const received_message& m) { return as_json(m).value("state", "") == "offline"; }, 5s, from);
  ASSERT_TRUE(status);
  EXPECT_EQ(as_json(*status)["reason"], "stopped");
  // The stop line counts the drops of both directions (none here).
  EXPECT_NE(service_->log_text().find("delivered, 0 inbound drops, 0 outbox drops"), std::string::npos);
}

TEST_F(Service, StartsWithTheBrokerDownAndConnectsWhenItComes) {
  broker_.stop();
  service_->start();
  std::this_thread::sleep_for(1500ms);  // the service must be up and retrying, not exited
  ASSERT_TRUE(service_->running());
  broker_.start();
  mqtt_test_client late(broker_.uri(), {"dm/#"});
  const auto online = late.wait_for(
      "dm/status", [](const received_message& m) { return as_json(m).value("state", "") == "online"; }, 40s);
  ASSERT_TRUE(online);
  const auto zone = late.wait_for(
      "dm/zone/room-a/state", [](const received_message&) { return true; }, 10s);
  ASSERT_TRUE(zone);
  EXPECT_EQ(as_json(*zone)["band"], "unknown");
}

TEST_F(Service, ReloadWithABadConfigKeepsTheOldOneAndRecordsIt) {
  start_service();
  publish_readings(17.5);
  ASSERT_TRUE(wait_zone_state("room-a", "safe"));
  std::size_t from = watcher_->size();
  service_->rewrite_config("site: broken\nzones: 3\n");
  ASSERT_TRUE(service_->send_signal(SIGHUP));
  const auto rejected = watcher_->wait_for(
      "dm/events",
      [](const received_message& m) {
        const auto j = as_json(m);
        return j.value("kind", "") == "service" && j.value("reason", "").find("reload rejected") == 0;
      },
      10s, from);
  ASSERT_TRUE(rejected);
  // Still supervising with the old config.
  from = watcher_->size();
  watcher_->publish("r/a/surface", "12.5");
  ASSERT_TRUE(wait_event(*watcher_, "band", "room-a", 5s, from));

  // A valid config is taken, and a service event records the reload.
  service_->rewrite_config(service_test_config(broker_.uri(), service_->db_path()));
  from = watcher_->size();
  ASSERT_TRUE(service_->send_signal(SIGHUP));
  const auto reloaded = watcher_->wait_for(
      "dm/events",
      [](const received_message& m) {
        const auto j = as_json(m);
        return j.value("kind", "") == "service" && j.value("reason", "") == "config reloaded";
      },
      10s, from);
  ASSERT_TRUE(reloaded);
  EXPECT_TRUE(service_->running());
  EXPECT_NE(service_->log_text().find("reload rejected"), std::string::npos);
}

TEST_F(Service, ReloadThatReadsANewTopicIsRejectedAsAWhole) {
  start_service();
  publish_readings(17.5);
  ASSERT_TRUE(wait_zone_state("room-a", "safe"));
  std::string text = service_test_config(broker_.uri(), service_->db_path());
  const std::string surface = "r/a/surface";
  ASSERT_NE(text.find(surface), std::string::npos);
  text.replace(text.find(surface), surface.size(), "r/a/surface-new");
  service_->rewrite_config(text);
  const std::size_t from = watcher_->size();
  ASSERT_TRUE(service_->send_signal(SIGHUP));
  const auto rejected = watcher_->wait_for(
      "dm/events",
      [](const received_message& m) {
        const auto j = as_json(m);
        return j.value("kind", "") == "service" &&
               j.value("reason", "").find("reload rejected (new input topics need a restart: 'r/a/surface-new')") == 0;
      },
      10s, from);
  ASSERT_TRUE(rejected);
  // The old config stays: the zone still reads its old surface topic.
  const std::size_t after = watcher_->size();
  watcher_->publish("r/a/surface", "12.5");
  ASSERT_TRUE(wait_event(*watcher_, "band", "room-a", 5s, after));
}

}  // namespace
}  // namespace dewmargin::test_support
