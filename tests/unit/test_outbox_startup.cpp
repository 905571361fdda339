// The outbox against the engine's real start-up output for a large site: everything the
// engine publishes in its first minutes is pushed into an outbox that sends nothing (the
// worst case: the broker has acknowledged nothing yet), and nothing may be dropped.
#include <gtest/gtest.h>

#include <algorithm>
#include <chrono>
#include <cstddef>
#include <string>
#include <vector>

#include "bench_site.h"
#include "dewmargin/config.h"
#include "dewmargin/engine.h"
#include "dewmargin/outbox.h"

namespace dewmargin {
namespace {

constexpr std::size_t k_zones = 10'000;

// The benchmarks' invented site (bench/bench_site.h: air temperature, humidity, one surface
// and a valve per zone, one loop per 100 zones), with the given stale_after_s everywhere.
site_config large_site(std::size_t zones, double stale_after_s) {
  site_config s = bench::bench_site(static_cast<int>(zones));
  for (loop_config& l : s.loops) l.stale_after_s = stale_after_s;
  for (zone_config& z : s.zones) z.thresholds.stale_after_s = stale_after_s;
  return s;
}

struct startup_run {
  outbox box;
  std::size_t unkeyed_published = 0;  // events and alarm events the engine handed out
  std::size_t keyed_published = 0;
  std::size_t distinct_keyed_topics = 0;
};

void push_all(engine_output& out, startup_run& run) {
  for (outbound_message& m : out.messages) {
    if (is_keyed(m.cls)) {
      ++run.keyed_published;
    } else {
      ++run.unkeyed_published;
    }
    (void)run.box.push(std::move(m));
  }
  out.clear();
}

// begin(), the service's start event, then `seconds` of ticks once a second; every
// `report_every_s` seconds each sensor of the first `reporting_zones` zones (and every loop's
// supply) sends a reading, spread over the interval the way a feed does. Zones whose sensors
// never report go missing once stale_after_s has passed since start.
startup_run run_startup(std::size_t zones, int seconds, int report_every_s, std::size_t reporting_zones,
                        double stale_after_s = 180.0) {
  const site_config site = large_site(zones, stale_after_s);
  engine core(site);
  startup_run run{outbox(outbox_capacity_for_zones(zones))};
  engine_output out;
  timestamp now = from_unix_ms(1'800'000'000'000);
  core.begin(now, {}, out);
  core.service_event(now, "stopped", "running", "started", out);
  push_all(out, run);
  const std::size_t per_second =
      (reporting_zones + static_cast<std::size_t>(report_every_s) - 1) / static_cast<std::size_t>(report_every_s);
  std::size_t next_zone = 0;
  for (int s = 1; s <= seconds; ++s) {
    for (std::size_t i = 0; i < per_second && reporting_zones > 0; ++i) {
      const std::string id = "z" + std::to_string(next_zone);
      core.on_message("b/" + id + "/temp", "24.0", now, out);
      core.on_message("b/" + id + "/rh", "50", now, out);
      core.on_message("b/" + id + "/surface", "18.5", now, out);
      next_zone = (next_zone + 1) % reporting_zones;
    }
    if (s % report_every_s == 1) {
      for (const loop_config& l : site.loops) core.on_message(l.supply_temp.topic, "17.0", now, out);
    }
    now += std::chrono::seconds(1);
    core.tick(now, out);
    push_all(out, run);
  }
  run.distinct_keyed_topics = 2 * zones + 2 * site.loops.size();  // zone state, valve; loop state, setpoint
  return run;
}

// Every sensor reports every 10 s: a band event (unknown to ok) and a valve event (opened)
// per zone, besides each zone's state and valve command (measured: 20,001 events with the
// start event, 20,200 keyed entries left of 60,600 keyed messages).
TEST(OutboxStartup, TenThousandReportingZonesDropNothing) {
  const startup_run run = run_startup(k_zones, 15, 10, k_zones);
  EXPECT_EQ(run.box.dropped_total(), 0U) << run.unkeyed_published << " events for capacity " << run.box.capacity();
  EXPECT_GE(run.unkeyed_published, 2 * k_zones) << "a band and a valve event per zone";
  EXPECT_LE(run.unkeyed_published, run.box.capacity());
  EXPECT_GE(run.keyed_published, run.box.keyed());
  EXPECT_LE(run.box.keyed(), run.distinct_keyed_topics) << "one waiting entry per topic, nothing in flight";
  EXPECT_EQ(run.box.size(), run.box.keyed() + run.unkeyed_published);
}

// No sensor ever reports (a feed not yet running): past stale_after_s every input goes
// missing, one event each, and the valves close. stale_after_s is 30 s here instead of the
// default 180 s only to keep the test short: the same events come, 150 ticks earlier (measured: 50,001 events, five per
// zone). This is also what a start with the broker down looks like: the sensors publish through it. Still no drop,
// though nothing was sent.
TEST(OutboxStartup, TenThousandSilentZonesDropNothing) {
  const startup_run run = run_startup(k_zones, 40, 10, 0, 30.0);
  EXPECT_EQ(run.box.dropped_total(), 0U) << run.unkeyed_published << " events for capacity " << run.box.capacity();
  EXPECT_GE(run.unkeyed_published, 3 * k_zones) << "an input event per sensor";
  EXPECT_LE(run.unkeyed_published, run.box.capacity());
  EXPECT_LE(run.box.keyed(), run.distinct_keyed_topics);
}

TEST(OutboxStartup, CapacityScalesWithZonesAboveAFloor) {
  EXPECT_EQ(outbox_capacity_for_zones(0), 10'000U);
  EXPECT_EQ(outbox_capacity_for_zones(1'000), 10'000U);
  EXPECT_EQ(outbox_capacity_for_zones(1'250), 10'000U);
  EXPECT_EQ(outbox_capacity_for_zones(10'000), 80'000U);
  EXPECT_EQ(outbox_capacity_for_zones(50'000), 400'000U);
}

}  // namespace
}  // namespace dewmargin
