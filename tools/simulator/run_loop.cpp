#include "run_loop.h"

#include <mqtt/async_client.h>
#include <unistd.h>

#include <chrono>
#include <cmath>
#include <cstdio>
#include <deque>
#include <ostream>
#include <thread>

#include "model/report.h"

namespace dewmargin::sim {
namespace {

using steady = std::chrono::steady_clock;
constexpr auto k_connect_retry = std::chrono::milliseconds(250);
constexpr auto k_trailing_drain = std::chrono::milliseconds(500);
// How long one wait for a lagging service may last before the simulator carries on without
// it (a service that publishes nothing cannot show that it caught up), and how often the
// wait looks again.
constexpr double k_service_wait_limit_s = 5.0;
constexpr auto k_service_poll = std::chrono::milliseconds(20);

void maybe_trace(const simulation& sim, std::ostream* trace) {
  if (!trace) return;
  const double minute_s = std::fmod(sim.now_s(), 60.0);
  if (minute_s < 1e-6 || minute_s > 60.0 - 1e-6) *trace << trace_rows(sim);
}

// Prints a status line each time the simulated clock passes a multiple of the interval.
class status_printer {
 public:
  status_printer(double every_s, double start_s) : every_s_(every_s), next_s_(start_s + every_s) {}
  void maybe_print(const simulation& sim, std::ostream& out) {
    if (every_s_ <= 0.0 || sim.now_s() + 1e-9 < next_s_) return;
    out << status_line(sim) << std::endl;
    while (next_s_ <= sim.now_s() + 1e-9) next_s_ += every_s_;
  }

 private:
  double every_s_;
  double next_s_;
};

double seconds_since(steady::time_point t0) { return std::chrono::duration<double>(steady::now() - t0).count(); }

// The MQTT client with a bounded window of messages handed over and not yet written out:
// a full window waits for the oldest one instead of overrunning the client's buffer.
class bounded_publisher {
 public:
  bounded_publisher(mqtt::async_client& cli, const run_options& o) : cli_(cli), o_(o) {}

  // Returns false when the broker took nothing for broker_timeout_s (reported in `why`).
  bool publish_all(std::vector<outbound>& msgs, pacer& pace, std::string& why) {
    for (const auto& m : msgs) {
      while (!in_flight_.empty() && in_flight_.front()->is_complete()) in_flight_.pop_front();
      if (static_cast<int>(in_flight_.size()) >= o_.max_in_flight) {
        const auto t0 = steady::now();
        const auto timeout = std::chrono::milliseconds(static_cast<long long>(o_.broker_timeout_s * 1000));
        if (!in_flight_.front()->wait_for(timeout)) {
          why = "the broker took no message for " + std::to_string(static_cast<int>(o_.broker_timeout_s)) + " s";
          return false;
        }
        in_flight_.pop_front();
        pace.waited_for_broker(seconds_since(t0));
      }
      in_flight_.push_back(cli_.publish(m.topic, m.payload.data(), m.payload.size(), m.qos, m.retained));
    }
    msgs.clear();
    return true;
  }

 private:
  mqtt::async_client& cli_;
  const run_options& o_;
  std::deque<mqtt::delivery_token_ptr> in_flight_;
};

// The first connect may come before the broker listens: retry it until the deadline.
bool connect_with_retry(mqtt::async_client& cli, const mqtt::connect_options& opts, steady::time_point deadline,
                        std::string& why) {
  for (;;) {
    try {
      cli.connect(opts)->wait();
      return true;
    } catch (const mqtt::exception& e) {
      why = e.what();
    }
    if (steady::now() >= deadline) return false;
    std::this_thread::sleep_for(k_connect_retry);
  }
}

// Follows how far the service's clock trails the simulator's and holds the simulation back
// while it trails by more than the limit (event time only: with the wall clock the service's
// time says nothing about the readings it has taken in).
class service_lag_guard {
 public:
  service_lag_guard(const simulation& sim, double max_lag_s)
      : enabled_(max_lag_s > 0.0 && sim.config().clock.source == clock_source::readings), max_lag_s_(max_lag_s) {}

  // Consumes messages until the service is within the limit (or the wait limit passes).
  // False when the connection was lost.
  bool hold(simulation& sim, mqtt::async_client& cli, pacer& pace) {
    if (!enabled_ || sim.broker_down()) return true;
    const auto service_s = sim.watch().service_time_s();
    if (!service_s) return true;
    if (gave_up_ && gave_up_at_s_ == *service_s) return true;  // silent since the last give-up
    gave_up_ = false;
    double lag_s = sim.now_s() - *service_s;
    pace.service_lag(lag_s);
    if (lag_s <= max_lag_s_) return true;
    const auto t0 = steady::now();
    mqtt::const_message_ptr msg;
    while (lag_s > max_lag_s_) {
      if (seconds_since(t0) >= k_service_wait_limit_s) {
        gave_up_ = true;
        gave_up_at_s_ = sim.watch().service_time_s().value_or(0.0);
        break;
      }
      if (cli.try_consume_message_for(&msg, k_service_poll)) {
        if (!msg) return false;
        sim.on_message(msg->get_topic(), msg->get_payload_str());
      }
      lag_s = sim.now_s() - sim.watch().service_time_s().value_or(sim.now_s());
    }
    pace.waited_for_service(seconds_since(t0));
    return true;
  }

 private:
  bool enabled_;
  double max_lag_s_;
  // The service's clock when the last wait was given up (a plain pair: GCC 12 misreads an optional here).
  bool gave_up_ = false;
  double gave_up_at_s_ = 0.0;
};

}  // namespace

std::string pace_text(const pace_report& p) {
  char speed[96];
  if (p.asked_speed > 0.0) {
    std::snprintf(speed, sizeof speed, "asked %gx, achieved %.0fx", p.asked_speed, p.achieved_speed);
  } else {
    std::snprintf(speed, sizeof speed, "as fast as possible, %.0fx", p.achieved_speed);
  }
  char buf[512];
  std::snprintf(buf, sizeof buf,
                "played %.2f h in %.1f s of wall time (%s); waited %.1f s for the service (%d times) and %.1f s for "
                "the broker (%d times), which moved the schedule back by %.1f s; the service trailed the readings by "
                "at most %.0f simulated s",
                p.sim_s / 3600.0, p.wall_s, speed, p.service_wait_s, p.service_stalls, p.broker_wait_s, p.broker_stalls,
                p.slowed_s, p.worst_service_lag_s);
  return buf;
}

int run_offline(simulation& sim, const run_options& o, std::ostream& out) {
  std::vector<outbound> ignored;
  status_printer status(o.status_every_s, sim.now_s());
  sim.begin(ignored);
  if (o.trace) *o.trace << trace_header() << trace_rows(sim);
  while (!sim.done()) {
    ignored.clear();
    sim.advance(ignored);
    maybe_trace(sim, o.trace);
    status.maybe_print(sim, out);
  }
  return 0;
}

int run_with_broker(simulation& sim, const run_options& o, std::ostream& out, std::ostream& err, pace_report& report) {
  const std::string client_id = "dewmargin-sim-" + std::to_string(::getpid());
  try {
    mqtt::async_client cli(o.broker_uri, client_id);
    auto opts =
        mqtt::connect_options_builder().clean_session(true).keep_alive_interval(std::chrono::seconds(30)).finalize();
    cli.start_consuming();
    const auto deadline = steady::now() + std::chrono::milliseconds(static_cast<long long>(o.wait_service_s * 1000));
    std::string why;
    if (!connect_with_retry(cli, opts, deadline, why)) {
      err << "dewmargin-sim: cannot connect to " << o.broker_uri << ": " << why << "\n";
      return 1;
    }
    const auto topics = sim.subscriptions();
    for (const auto& t : topics) cli.subscribe(t, 1)->wait();

    // Wait for the service: its retained status says "online" once it is connected and subscribed.
    mqtt::const_message_ptr msg;
    while (!sim.watch().tally().online) {
      if (!cli.try_consume_message_until(&msg, deadline)) {
        err << "dewmargin-sim: the service did not report online on " << sim.config().publish.prefix
            << "/status within " << o.wait_service_s << " s\n";
        return 1;
      }
      if (!msg) {
        err << "dewmargin-sim: lost the connection to " << o.broker_uri << "\n";
        return 1;
      }
      sim.on_message(msg->get_topic(), msg->get_payload_str());
    }
    out << "dewmargin-sim: service online; playing '" << sim.script().name << "' from " << format_iso8601_utc(sim.now())
        << " at " << o.speed << "x" << std::endl;

    status_printer status(o.status_every_s, sim.now_s());
    bounded_publisher publisher(cli, o);
    service_lag_guard lag_guard(sim, o.max_service_lag_s);
    pacer pace(o.speed, sim.now_s());
    std::vector<outbound> outgoing;
    const auto wall_start = steady::now();
    const auto lost = [&]() {
      err << "dewmargin-sim: lost the connection to " << o.broker_uri << "\n";
      return 1;
    };
    const auto stuck = [&]() {
      err << "dewmargin-sim: " << why << " (" << o.broker_uri << ")\n";
      return 1;
    };
    sim.begin(outgoing);
    if (!publisher.publish_all(outgoing, pace, why)) return stuck();
    if (o.trace) *o.trace << trace_header() << trace_rows(sim);
    while (!sim.done()) {
      if (!lag_guard.hold(sim, cli, pace)) return lost();
      // Take the service's commands until the wall clock reaches this step's turn.
      const auto due =
          wall_start + std::chrono::microseconds(static_cast<long long>(pace.due_wall_s(sim.now_s()) * 1e6));
      for (;;) {
        const bool got = o.speed > 0.0 ? cli.try_consume_message_until(&msg, due) : cli.try_consume_message(&msg);
        if (!got) break;
        if (!msg) return lost();
        sim.on_message(msg->get_topic(), msg->get_payload_str());
      }
      pace.arrived(sim.now_s(), seconds_since(wall_start));
      sim.advance(outgoing);
      if (!publisher.publish_all(outgoing, pace, why)) return stuck();
      maybe_trace(sim, o.trace);
      status.maybe_print(sim, out);
    }
    report = pace.report(sim.now_s(), seconds_since(wall_start));
    // The service's answers to the last readings.
    const auto drain_until = steady::now() + k_trailing_drain;
    while (cli.try_consume_message_until(&msg, drain_until) && msg)
      sim.on_message(msg->get_topic(), msg->get_payload_str());
    out << "dewmargin-sim: " << pace_text(report) << std::endl;
    cli.disconnect()->wait();
    cli.stop_consuming();
  } catch (const mqtt::exception& e) {
    err << "dewmargin-sim: MQTT: " << e.what() << "\n";
    return 1;
  }
  return 0;
}

}  // namespace dewmargin::sim
