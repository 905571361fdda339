#include "run_loop.h"

#include <mqtt/async_client.h>
#include <unistd.h>

#include <chrono>
#include <cmath>
#include <ostream>
#include <thread>

#include "model/report.h"

namespace dewmargin::sim {
namespace {

using steady = std::chrono::steady_clock;
constexpr auto k_connect_retry = std::chrono::milliseconds(250);
constexpr auto k_trailing_drain = std::chrono::milliseconds(500);

// Prints a status line each time the simulated clock passes a multiple of the interval.
void maybe_trace(const simulation& sim, std::ostream* trace) {
  if (!trace) return;
  const double minute_s = std::fmod(sim.now_s(), 60.0);
  if (minute_s < 1e-6 || minute_s > 60.0 - 1e-6) *trace << trace_rows(sim);
}

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

void publish_all(mqtt::async_client& cli, std::vector<outbound>& msgs) {
  for (const auto& m : msgs) cli.publish(m.topic, m.payload.data(), m.payload.size(), m.qos, m.retained);
  msgs.clear();
}

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

}  // namespace

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

int run_with_broker(simulation& sim, const run_options& o, std::ostream& out, std::ostream& err) {
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
    std::vector<outbound> outgoing;
    const auto wall_start = steady::now();
    const double sim_start_s = sim.now_s();
    double worst_lag_s = 0.0;
    sim.begin(outgoing);
    publish_all(cli, outgoing);
    if (o.trace) *o.trace << trace_header() << trace_rows(sim);
    while (!sim.done()) {
      // Take the service's commands until the wall clock reaches this step's turn.
      const auto due = wall_start + std::chrono::microseconds(static_cast<long long>(
                                        o.speed > 0.0 ? (sim.now_s() - sim_start_s) / o.speed * 1e6 : 0.0));
      for (;;) {
        const bool got = o.speed > 0.0 ? cli.try_consume_message_until(&msg, due) : cli.try_consume_message(&msg);
        if (!got) break;
        if (!msg) {
          err << "dewmargin-sim: lost the connection to " << o.broker_uri << "\n";
          return 1;
        }
        sim.on_message(msg->get_topic(), msg->get_payload_str());
      }
      const double lag_s = std::chrono::duration<double>(steady::now() - due).count();
      if (lag_s > worst_lag_s) worst_lag_s = lag_s;
      sim.advance(outgoing);
      publish_all(cli, outgoing);
      maybe_trace(sim, o.trace);
      status.maybe_print(sim, out);
    }
    // The service's answers to the last readings.
    const auto drain_until = steady::now() + k_trailing_drain;
    while (cli.try_consume_message_until(&msg, drain_until) && msg)
      sim.on_message(msg->get_topic(), msg->get_payload_str());
    const double wall_s = std::chrono::duration<double>(steady::now() - wall_start).count();
    out << "dewmargin-sim: played " << (sim.now_s() - sim_start_s) / 3600.0 << " h in " << wall_s
        << " s of wall time (worst lag behind the pace " << worst_lag_s << " s)" << std::endl;
    cli.disconnect()->wait();
    cli.stop_consuming();
  } catch (const mqtt::exception& e) {
    err << "dewmargin-sim: MQTT: " << e.what() << "\n";
    return 1;
  }
  return 0;
}

}  // namespace dewmargin::sim
