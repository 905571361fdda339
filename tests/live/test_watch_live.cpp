// `dewmargin watch` against real brokers: a snapshot of retained states, the live view under
// tmux (acknowledge, quit), and one central broker bridging two buildings.
#include <gtest/gtest.h>

#include <fstream>
#include <sstream>

#include "live_test_support.h"
#include "mosquitto_fixture.h"
#include "mqtt_test_client.h"
#include "service_fixture.h"

namespace dewmargin::test_support {
namespace {

using namespace std::chrono_literals;

std::vector<std::string> lines_of(const std::string& text) {
  std::vector<std::string> out;
  std::istringstream in(text);
  for (std::string line; std::getline(in, line);) out.push_back(line);
  return out;
}

// The index of the first line starting with `head`, or -1.
int line_starting(const std::vector<std::string>& lines, const std::string& head) {
  for (std::size_t i = 0; i < lines.size(); ++i) {
    if (lines[i].rfind(head, 0) == 0) return static_cast<int>(i);
  }
  return -1;
}

std::string zone_state(const std::string& zone, const std::string& band, const std::string& margin,
                       const std::string& extra = "") {
  return R"({"site":"watch-test","zone":")" + zone + R"(","ts":"2026-07-14T13:00:00Z","band":")" + band +
         R"(","dew_point_c":15.0,"surface_min_c":17.0,"supply_c":16.0,"margin_k":)" + margin +
         R"(,"valve":"open","alarm":{"active":false,"acknowledged":true,"shelved_until":null},)" +
         R"("minutes_to_condensation":null)" + extra + "}";
}

TEST(LiveWatch, OncePrintsRetainedStatesWorstFirst) {
  mosquitto_broker broker;
  broker.start();
  {
    mqtt_test_client publisher(broker.uri(), {});
    publisher.publish("dm/status",
                      R"({"state":"online","site":"watch-test","version":"0.1.0","ts":"2026-07-14T13:00:00Z"})", true);
    publisher.publish("dm/zone/lobby/state", zone_state("lobby", "safe", "4.20"), true);
    publisher.publish("dm/zone/meeting-2/state", zone_state("meeting-2", "tight", "1.60"), true);
    publisher.publish(
        "dm/zone/meeting-1/state",
        zone_state("meeting-1", "condensing", "-0.30", R"(,"valve_hold":"dew point above supply - 1.0 K")"), true);
    publisher.publish("dm/zone/office/state", zone_state("office", "tight", "1.10"), true);
    publisher.publish("dm/zone/store/state", zone_state("store", "unknown", "null"), true);
    // The retained states are on the broker once a second subscriber sees them all.
    mqtt_test_client check(broker.uri(), {"dm/zone/+/state"});
    ASSERT_TRUE(check.wait_for_count("dm/zone/store/state", 1, 5s));
  }
  temp_dir dir;
  const auto r =
      run_dewmargin({"watch", "--broker", broker.uri(), "--prefix", "dm", "--once", "--width", "120"}, dir.path());
  ASSERT_EQ(r.exit_code, 0) << r.out;
  const auto lines = lines_of(r.out);
  ASSERT_GE(lines.size(), 8u) << r.out;
  EXPECT_EQ(lines[0], "dewmargin watch | " + broker.uri() + " | connected | " + lines[0].substr(lines[0].size() - 9));
  EXPECT_EQ(lines[1], "unknown 1  condensing 1  alarm 0  tight 2  safe 1 | service online | K, °C");
  EXPECT_EQ(lines[2].rfind("  zone", 0), 0u) << lines[2];
  // Worst first: unknown, condensing, then tight by margin, then safe.
  EXPECT_EQ(lines[3].rfind("? store ", 0), 0u) << r.out;
  EXPECT_EQ(lines[4].rfind("# meeting-1 ", 0), 0u) << r.out;
  EXPECT_NE(lines[4].find("open*"), std::string::npos) << lines[4];
  EXPECT_NE(lines[4].find("dew point above supply - 1.0 K"), std::string::npos) << lines[4];
  EXPECT_EQ(lines[5].rfind("~ office ", 0), 0u) << r.out;
  EXPECT_EQ(lines[6].rfind("~ meeting-2 ", 0), 0u) << r.out;
  EXPECT_EQ(lines[7].rfind("  lobby ", 0), 0u) << r.out;
  EXPECT_NE(lines[4].find("-0.30"), std::string::npos);
  for (const auto& l : lines) EXPECT_EQ(l.find('\x1b'), std::string::npos) << "colour into a file";
}

TEST(LiveWatch, OnceFromTheServiceConfigShowsTheServicesZones) {
  mosquitto_broker broker;
  broker.start();
  temp_dir dir;
  service_under_test service(broker.uri(), dir.path());
  mqtt_test_client observer(broker.uri(), {"dm/zone/+/state"});
  mqtt_test_client plant(broker.uri(), {});
  service.start();
  ASSERT_TRUE(observer.wait_for_count("dm/zone/room-b/state", 1, 15s)) << service.log_text();
  publish_readings(plant, /*room_a_wet=*/true, /*room_b_wet=*/false);
  ASSERT_TRUE(observer.wait_for(
      "dm/zone/room-a/state", [](const received_message& m) { return as_json(m).value("band", "") == "condensing"; },
      10s))
      << service.log_text();
  ASSERT_TRUE(observer.wait_for(
      "dm/zone/room-b/state", [](const received_message& m) { return as_json(m).value("band", "") == "safe"; }, 10s));
  const auto r = run_dewmargin({"watch", "--config", service.config_path().string(), "--once"}, dir.path());
  ASSERT_EQ(r.exit_code, 0) << r.out;
  const auto lines = lines_of(r.out);
  const int a = line_starting(lines, "# room-a ");
  const int b = line_starting(lines, "  room-b ");
  ASSERT_GE(a, 3) << r.out;
  EXPECT_EQ(b, a + 1) << r.out;
  EXPECT_NE(lines[static_cast<std::size_t>(a)].find("ACTIVE"), std::string::npos) << r.out;
  for (const auto& l : lines) EXPECT_LE(l.size(), 82u) << "wider than 80 columns: " << l;  // '°' is two bytes
  service.stop();
}

TEST(LiveWatch, BadOptionsAreOneLineUsageErrors) {
  temp_dir dir;
  const struct {
    std::vector<std::string> args;
    int code;
    std::string message;
  } cases[] = {
      {{"watch", "--once"}, 2, "dewmargin: watch: give --config FILE, or --broker URI and --prefix P\n"},
      {{"watch", "--broker", "http://x", "--once"},
       2,
       "dewmargin: watch: --broker 'http://x' must start with tcp://, ssl://, mqtt:// or mqtts://\n"},
      {{"watch", "--broker", "tcp://127.0.0.1:1", "--prefix", "dm/#", "--once"},
       2,
       "dewmargin: watch: --prefix 'dm/#' must be a topic prefix without '+', '#' or a leading or trailing '/'\n"},
      {{"watch", "--broker", "tcp://127.0.0.1:1", "--by", "J K", "--once"},
       2,
       "dewmargin: watch: --by 'J K' must be 1 to 16 characters without blanks\n"},
      {{"watch", "--broker", "tcp://127.0.0.1:1"},
       2,
       "dewmargin: watch: the live view needs a terminal; use --once for a snapshot\n"},
  };
  for (const auto& c : cases) {
    const auto r = run_dewmargin(c.args, dir.path());
    EXPECT_EQ(r.exit_code, c.code) << r.out;
    EXPECT_EQ(r.out, c.message);
  }
  const int port = free_loopback_port();
  const auto down = run_dewmargin(
      {"watch", "--broker", "tcp://127.0.0.1:" + std::to_string(port), "--once", "--wait-s", "1"}, dir.path());
  EXPECT_EQ(down.exit_code, 1) << down.out;
  EXPECT_EQ(down.out.rfind("dewmargin: watch: tcp://127.0.0.1:" + std::to_string(port) + ": cannot connect", 0), 0u)
      << down.out;
}

TEST(LiveWatch, InteractiveViewUnderTmuxAcknowledgesAndQuitsOnQ) {
  if (run_shell("command -v tmux").exit_code != 0)
    GTEST_SKIP() << "tmux is not installed (scripts/install-deps adds it)";
  mosquitto_broker broker;
  broker.start();
  temp_dir dir;
  service_under_test service(broker.uri(), dir.path());
  mqtt_test_client observer(broker.uri(), {"dm/zone/+/state", "dm/events"});
  mqtt_test_client plant(broker.uri(), {});
  service.start();
  ASSERT_TRUE(observer.wait_for_count("dm/zone/room-b/state", 1, 15s)) << service.log_text();
  publish_readings(plant, /*room_a_wet=*/true, /*room_b_wet=*/false);
  ASSERT_TRUE(observer.wait_for(
      "dm/zone/room-a/state", [](const received_message& m) { return as_json(m).value("band", "") == "condensing"; },
      10s));
  const auto exit_file = dir.path() / "watch.exit";
  const std::string command = std::string(DEWMARGIN_BIN) + " watch --config " +
                              shell_quote(service.config_path().string()) + " --by JK; echo $? > " +
                              shell_quote(exit_file.string());
  tmux_session tmux(dir.path(), command, 100, 20);
  std::string screen;
  ASSERT_TRUE(eventually(
      [&] {
        screen = tmux.screen();
        return screen.find("# room-a") != std::string::npos && screen.find("room-b") != std::string::npos &&
               screen.find("| connected |") != std::string::npos;
      },
      10s))
      << screen;
  EXPECT_NE(screen.find("ACTIVE"), std::string::npos) << screen;
  EXPECT_LT(screen.find("# room-a"), screen.find("  room-b")) << screen;
  EXPECT_NE(screen.find("condensing 1"), std::string::npos) << screen;

  tmux.keys("a room-a window closed");
  tmux.key("Enter");
  ASSERT_TRUE(eventually(
      [&] {
        screen = tmux.screen();
        return screen.find("service answer: ack room-a unacknowledged -> acknowledged by JK") != std::string::npos;
      },
      10s))
      << screen;
  const auto ack = wait_event(observer, "ack", "room-a", 5s);
  ASSERT_TRUE(ack);
  EXPECT_EQ((*ack)["by"], "JK");
  EXPECT_EQ((*ack)["note"], "window closed");
  ASSERT_TRUE(eventually([&] { return tmux.screen().find("acked") != std::string::npos; }, 5s)) << tmux.screen();

  // A bad command is answered on the screen and sends nothing.
  tmux.keys("s room-a 0");
  tmux.key("Enter");
  ASSERT_TRUE(eventually(
      [&] { return tmux.screen().find("shelve needs whole minutes from 1 to 1440") != std::string::npos; }, 5s))
      << tmux.screen();

  tmux.keys("q");
  ASSERT_TRUE(eventually([&] { return std::filesystem::exists(exit_file) && read_text_file(exit_file) == "0\n"; }, 5s))
      << tmux.screen();
  service.stop();
}

TEST(LiveWatch, CentralBrokerBridgingTwoBuildingsShowsBothSitesInOrder) {
  mosquitto_broker site_a;
  mosquitto_broker site_b;
  site_a.start();
  site_b.start();
  // The central broker pulls each building's states and events in under a prefix of its
  // own and sends commands back out (docs/several-buildings.md).
  const auto bridge = [](const std::string& name, int port, const std::string& local) {
    return std::vector<std::string>{"connection " + name,
                                    "address 127.0.0.1:" + std::to_string(port),
                                    "cleansession true",
                                    "restart_timeout 1 2",
                                    "topic status in 1 " + local + " dm/",
                                    "topic zone/+/state in 1 " + local + " dm/",
                                    "topic loop/+/state in 1 " + local + " dm/",
                                    "topic dehumidifier/+/state in 1 " + local + " dm/",
                                    "topic events in 1 " + local + " dm/",
                                    "topic cmd/# out 1 " + local + " dm/"};
  };
  broker_options central_options;
  for (auto& line : bridge("bldg-a", site_a.port(), "bldg-a/dm/")) central_options.extra_config.push_back(line);
  for (auto& line : bridge("bldg-b", site_b.port(), "bldg-b/dm/")) central_options.extra_config.push_back(line);
  mosquitto_broker central(central_options);
  central.start();

  temp_dir dir_a;
  temp_dir dir_b;
  service_under_test service_a(site_a.uri(), dir_a.path());
  service_under_test service_b(site_b.uri(), dir_b.path());
  mqtt_test_client watch_central(central.uri(), {"bldg-a/dm/zone/+/state", "bldg-b/dm/zone/+/state"});
  mqtt_test_client plant_a(site_a.uri(), {});
  mqtt_test_client plant_b(site_b.uri(), {});
  mqtt_test_client seen_a(site_a.uri(), {"dm/zone/+/state"});
  mqtt_test_client seen_b(site_b.uri(), {"dm/zone/+/state"});
  service_a.start();
  service_b.start();
  ASSERT_TRUE(seen_a.wait_for_count("dm/zone/room-b/state", 1, 15s)) << service_a.log_text();
  ASSERT_TRUE(seen_b.wait_for_count("dm/zone/room-b/state", 1, 15s)) << service_b.log_text();
  publish_readings(plant_a, /*room_a_wet=*/true, /*room_b_wet=*/false);
  publish_readings(plant_b, /*room_a_wet=*/false, /*room_b_wet=*/true);
  const auto band_is = [](const char* band) {
    return [band](const received_message& m) { return as_json(m).value("band", "") == band; };
  };
  ASSERT_TRUE(watch_central.wait_for("bldg-a/dm/zone/room-a/state", band_is("condensing"), 15s)) << central.log_text();
  ASSERT_TRUE(watch_central.wait_for("bldg-a/dm/zone/room-b/state", band_is("safe"), 15s)) << central.log_text();
  ASSERT_TRUE(watch_central.wait_for("bldg-b/dm/zone/room-a/state", band_is("safe"), 15s)) << central.log_text();
  ASSERT_TRUE(watch_central.wait_for("bldg-b/dm/zone/room-b/state", band_is("condensing"), 15s)) << central.log_text();

  temp_dir dir;
  const auto r = run_dewmargin({"watch", "--broker", central.uri(), "--prefix", "bldg-a/dm", "--prefix", "bldg-b/dm",
                                "--once", "--width", "100"},
                               dir.path());
  ASSERT_EQ(r.exit_code, 0) << r.out;
  const auto lines = lines_of(r.out);
  EXPECT_NE(lines[1].find("condensing 2"), std::string::npos) << r.out;
  EXPECT_NE(lines[1].find("2 sites"), std::string::npos) << r.out;
  const int head_a = line_starting(lines, "-- bldg-a/dm (service-test): service online");
  const int head_b = line_starting(lines, "-- bldg-b/dm (service-test): service online");
  ASSERT_GE(head_a, 3) << r.out;
  EXPECT_EQ(head_b, head_a + 3) << r.out;
  EXPECT_EQ(lines[static_cast<std::size_t>(head_a + 1)].rfind("# room-a ", 0), 0u) << r.out;
  EXPECT_EQ(lines[static_cast<std::size_t>(head_a + 2)].rfind("  room-b ", 0), 0u) << r.out;
  EXPECT_EQ(lines[static_cast<std::size_t>(head_b + 1)].rfind("# room-b ", 0), 0u) << r.out;
  EXPECT_EQ(lines[static_cast<std::size_t>(head_b + 2)].rfind("  room-a ", 0), 0u) << r.out;

  // A command given at the central broker reaches the building's service and its answer comes back.
  mqtt_test_client operator_client(central.uri(), {"bldg-b/dm/events"});
  operator_client.publish("bldg-b/dm/cmd/ack", R"({"zone":"room-b","by":"JK"})");
  const auto answer = operator_client.wait_for(
      "bldg-b/dm/events", [](const received_message& m) { return as_json(m).value("kind", "") == "ack"; }, 10s);
  ASSERT_TRUE(answer) << service_b.log_text();
  EXPECT_EQ(as_json(*answer)["zone"], "room-b");
  service_a.stop();
  service_b.stop();
}

}  // namespace
}  // namespace dewmargin::test_support
