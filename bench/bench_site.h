#pragma once
// The invented site the in-process benchmarks share (engine_bench, micro_bench): `zones`
// zones with air, humidity and surface inputs and a valve each, one loop per 100 zones.
#include <algorithm>
#include <string>
#include <vector>

#include "dewmargin/config.h"

namespace dewmargin::bench {

inline input_config bench_input(const std::string& topic) {
  input_config c;
  c.topic = topic;
  return c;
}

inline site_config bench_site(int zones) {
  site_config s;
  s.site = "bench";
  s.broker.client_id = "bench";
  s.publish.prefix = "dm";
  const int loops = std::max(1, zones / 100);
  for (int l = 0; l < loops; ++l) {
    loop_config lc;
    lc.id = "loop-" + std::to_string(l);
    lc.supply_temp = bench_input("plant/" + lc.id + "/supply");
    lc.setpoint.topic = "plant/" + lc.id + "/sp";
    s.loops.push_back(lc);
  }
  for (int z = 0; z < zones; ++z) {
    zone_config zc;
    zc.id = "z" + std::to_string(z);
    zc.loop = "loop-" + std::to_string(z % loops);
    zc.air_temp = bench_input("b/" + zc.id + "/temp");
    zc.humidity.push_back(bench_input("b/" + zc.id + "/rh"));
    zc.surfaces.push_back(bench_input("b/" + zc.id + "/surface"));
    zc.valve = valve_config{"b/" + zc.id + "/valve", "open", "closed", 600.0};
    s.zones.push_back(zc);
  }
  return s;
}

// The bench site's zone input topics, each zone's three in turn (air, humidity, surface).
inline std::vector<std::string> bench_zone_topics(int zones) {
  std::vector<std::string> topics;
  for (int z = 0; z < zones; ++z) {
    for (const char* what : {"temp", "rh", "surface"}) topics.push_back("b/z" + std::to_string(z) + "/" + what);
  }
  return topics;
}

// Payloads for those topics (index: topic % 3, then a step of 4): values that wander a little
// around a safe margin, as most readings do.
inline constexpr const char* k_bench_payloads[3][4] = {
    {"24.0", "24.1", "24.2", "24.1"}, {"50", "51", "52", "51"}, {"17.0", "16.9", "16.8", "16.9"}};

}  // namespace dewmargin::bench
