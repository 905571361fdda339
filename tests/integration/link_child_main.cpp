// A service stand-in for the Last Will test: it connects a link, prints "ready" once
// the link is ready, and then waits to be killed (it gives up by itself after 60 s).
// A separate program (fork + exec) because forking a process that already runs the
// client library's threads leaves its locks in an unknown state in the child.
//
// usage: dewmargin_link_child URI CLIENT_ID STATUS_TOPIC ONLINE_PAYLOAD WILL_PAYLOAD
#include <chrono>
#include <cstdio>
#include <string>
#include <thread>

#include "dewmargin/mqtt_link.h"

int main(int argc, char** argv) {
  if (argc != 6) {
    std::fprintf(stderr, "usage: %s URI CLIENT_ID STATUS_TOPIC ONLINE_PAYLOAD WILL_PAYLOAD\n", argv[0]);
    return 2;
  }
  dewmargin::mqtt_link_options options;
  options.broker.uri = argv[1];
  options.broker.client_id = argv[2];
  options.status_topic = argv[3];
  options.online_payload = argv[4];
  options.offline_will_payload = argv[5];
  options.report = [](dewmargin::link_report_level, const std::string& text) {
    std::fprintf(stderr, "link: %s\n", text.c_str());
  };
  auto link = dewmargin::mqtt_link::create(options);
  if (!link.ok()) {
    std::fprintf(stderr, "%s\n", link.err().message.c_str());
    return 2;
  }
  link.value().start();
  const auto deadline = std::chrono::steady_clock::now() + std::chrono::seconds(60);
  bool announced = false;
  while (std::chrono::steady_clock::now() < deadline) {
    if (!announced && link.value().ready()) {
      std::printf("ready\n");
      std::fflush(stdout);
      announced = true;
    }
    std::this_thread::sleep_for(std::chrono::milliseconds(20));
  }
  return 3;
}
