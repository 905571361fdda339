// Load generator and probes for the end-to-end benchmarks (bench/run drives it).
//
//   site        writes a site config of N zones (3 inputs and a valve each, a loop per 50 zones)
//               plus one probe zone, all on topics under lg/
//   subscribe   a bare subscriber (own process, message callback, nothing else): counts COUNT
//               messages on lg/#, says so on lg-done/<id>, prints its own CPU time, and exits
//   throughput  publishes COUNT bare-number readings over several connections as fast as the
//               broker takes them, to either the bare subscriber (target bare) or the running
//               service (target service), and reports the rate at which the target has taken
//               them all, with the target's CPU time and memory (from /proc)
//   latency     the round trip of a reading: through a bare echo client (target echo) or through
//               the service (target service: a surface reading that makes the probe zone condense,
//               answered by its band event), p50/p99/max
//   ready       waits for the service's retained status "online" and prints when it came
//
// It prints human lines and `RESULT key value unit` lines for bench/run. The probe and echo
// clients set TCP no-delay on their sockets (tcp_nodelay.h), as the service does.
#include <fcntl.h>
#include <mqtt/async_client.h>
#include <sys/resource.h>
#include <sys/socket.h>
#include <unistd.h>

#include <CLI/CLI.hpp>
#include <algorithm>
#include <atomic>
#include <chrono>
#include <condition_variable>
#include <cstdio>
#include <deque>
#include <fstream>
#include <mutex>
#include <nlohmann/json.hpp>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include "dewmargin/tcp_nodelay.h"

namespace {

using clock_type = std::chrono::steady_clock;

double seconds_since(clock_type::time_point t0) {
  return std::chrono::duration<double>(clock_type::now() - t0).count();
}

void result(const char* key, double value, const char* unit) {
  std::printf("RESULT %s %.6g %s\n", key, value, unit);
  std::fflush(stdout);
}

// ---- the site ----

constexpr int k_zones_per_loop = 50;

std::string zone_id(int z) {
  char buf[16];
  std::snprintf(buf, sizeof buf, "z%05d", z);
  return buf;
}

int loop_count(int zones) { return std::max(1, (zones + k_zones_per_loop - 1) / k_zones_per_loop); }

void write_site(const std::string& path, int zones, int port, const std::string& dir, const std::string& prefix,
                int http_port) {
  std::ostringstream y;
  y << "site: bench-" << zones << "\n"
    << "broker: { uri: tcp://127.0.0.1:" << port << ", client_id: dewmargin-bench, keepalive_s: 30 }\n"
    << "storage: { path: " << dir << "/history.db }\n"
    << "publish: { prefix: " << prefix << ", min_interval_s: 5 }\n"
    << "logging: { level: info }\n";
  if (http_port > 0) y << "http: { listen: \"127.0.0.1:" << http_port << "\" }\n";
  y << "loops:\n";
  for (int l = 0; l < loop_count(zones); ++l) {
    y << "  - { id: loop" << l << ", supply_temp: { topic: lg/loop" << l << "/supply }, setpoint: { topic: lg/loop" << l
      << "/sp, min_c: 15.0, max_c: 20.0 } }\n";
  }
  y << "  - { id: probe-loop, supply_temp: { topic: lg/probe/supply }, setpoint: { topic: lg/probe/sp, min_c: 15.0, "
       "max_c: 20.0 } }\n";
  y << "zones:\n";
  for (int z = 0; z < zones; ++z) {
    const std::string id = zone_id(z);
    y << "  - { id: " << id << ", loop: loop" << z / k_zones_per_loop << ", air_temp: { topic: lg/" << id
      << "/t }, humidity: { topic: lg/" << id << "/rh }, surfaces: [ { topic: lg/" << id
      << "/s } ], valve: { topic: lg/" << id << "/valve } }\n";
  }
  y << "  - { id: probe, loop: probe-loop, air_temp: { topic: lg/probe/t }, humidity: { topic: lg/probe/rh }, "
       "surfaces: [ { topic: lg/probe/s } ], valve: { topic: lg/probe/valve } }\n";
  std::ofstream f(path);
  f << y.str();
  if (!f) throw std::runtime_error("cannot write " + path);
}

// ---- clients ----

// Paho C clients share the library's threads: connected one after another, each connect after
// the first waited about 2 s for the shared receive loop. So the connects overlap.
std::vector<std::unique_ptr<mqtt::async_client>> connect_clients(int port, const std::vector<std::string>& ids,
                                                                 bool nodelay) {
  const std::string uri = "tcp://127.0.0.1:" + std::to_string(port);
  std::vector<std::unique_ptr<mqtt::async_client>> clients;
  std::vector<mqtt::token_ptr> tokens;
  for (const auto& id : ids) {
    clients.push_back(std::make_unique<mqtt::async_client>(
        uri, id, mqtt::create_options_builder().max_buffered_messages(2000).send_while_disconnected(false).finalize()));
    auto opts =
        mqtt::connect_options_builder().clean_session(true).keep_alive_interval(std::chrono::seconds(60)).finalize();
    opts.set_max_inflight(200);
    tokens.push_back(clients.back()->connect(opts));
  }
  for (auto& t : tokens) t->wait();
  if (nodelay) dewmargin::set_tcp_nodelay_to_peer(port);
  return clients;
}

std::unique_ptr<mqtt::async_client> connect_client(int port, const std::string& id, bool nodelay) {
  return std::move(connect_clients(port, {id}, nodelay).front());
}

// Every message this program sends has been acknowledged (or does not matter) by the time it
// disconnects: no grace period for in-flight messages, and the disconnects overlap.
void close_all(std::vector<std::unique_ptr<mqtt::async_client>>& clients) {
  std::vector<mqtt::token_ptr> tokens;
  for (auto& c : clients) tokens.push_back(c->disconnect(0));
  for (auto& t : tokens) t->wait_for(std::chrono::seconds(2));
}

void close_all(std::unique_ptr<mqtt::async_client>& client) {
  std::vector<std::unique_ptr<mqtt::async_client>> one;
  one.push_back(std::move(client));
  close_all(one);
}

// The reading of message m: which topic and what value. Readings cycle over every zone's
// three inputs and every loop's supply; values wander a little so states move now and then.
struct reading_plan {
  int zones;
  int loops;
  [[nodiscard]] int period() const { return 3 * zones + loops; }
  void at(long m, std::string& topic, char* value, std::size_t value_size) const {
    const int slot = static_cast<int>(m % period());
    const double wobble = static_cast<double>((m * 7919) % 101) / 100.0 * 0.4;
    if (slot < 3 * zones) {
      const std::string id = zone_id(slot / 3);
      switch (slot % 3) {
        case 0:
          topic = "lg/" + id + "/t";
          std::snprintf(value, value_size, "%.2f", 24.0 + wobble);
          break;
        case 1:
          topic = "lg/" + id + "/rh";
          std::snprintf(value, value_size, "%.2f", 48.0 + 4.0 * wobble);
          break;
        default:
          topic = "lg/" + id + "/s";
          std::snprintf(value, value_size, "%.2f", 19.5 + wobble);
      }
    } else {
      topic = "lg/loop" + std::to_string(slot - 3 * zones) + "/supply";
      std::snprintf(value, value_size, "%.2f", 17.0 + wobble);
    }
  }
};

// Publishes its share of the readings (m = first, first + stride, ...) keeping at most
// `window` publishes in flight, then the sentinel (a command the service rejects).
void publish_share(mqtt::async_client& c, const reading_plan& plan, long first, long count, int stride, int qos,
                   const std::string& sentinel_topic, const std::string& sentinel_payload) {
  std::deque<mqtt::delivery_token_ptr> window;
  constexpr std::size_t k_window = 150;
  std::string topic;
  char value[32];
  for (long m = first; m < count; m += stride) {
    plan.at(m, topic, value, sizeof value);
    for (;;) {
      try {
        window.push_back(c.publish(topic, value, std::strlen(value), qos, false));
        break;
      } catch (const mqtt::exception&) {
        // The library's buffer is full: wait for the oldest and try again.
        if (window.empty()) std::this_thread::sleep_for(std::chrono::milliseconds(1));
      }
      if (!window.empty()) {
        window.front()->wait();
        window.pop_front();
      }
    }
    while (window.size() >= k_window) {
      window.front()->wait();
      window.pop_front();
    }
  }
  for (auto& t : window) t->wait();
  if (!sentinel_topic.empty()) c.publish(sentinel_topic, sentinel_payload, 1, false)->wait();
}

struct proc_sample {
  double cpu_s = 0;
  long rss_kib = 0;
  long hwm_kib = 0;
};

proc_sample sample_process(int pid) {
  proc_sample s;
  if (pid <= 0) return s;
  std::ifstream stat("/proc/" + std::to_string(pid) + "/stat");
  std::string line;
  std::getline(stat, line);
  const auto close = line.rfind(')');
  std::istringstream rest(line.substr(close + 2));
  std::string field;
  long utime = 0, stime = 0;
  for (int i = 3; i <= 15 && rest >> field; ++i) {
    if (i == 14) utime = std::stol(field);
    if (i == 15) stime = std::stol(field);
  }
  s.cpu_s = static_cast<double>(utime + stime) / static_cast<double>(sysconf(_SC_CLK_TCK));
  std::ifstream status("/proc/" + std::to_string(pid) + "/status");
  while (std::getline(status, line)) {
    if (line.rfind("VmRSS:", 0) == 0) s.rss_kib = std::stol(line.substr(6));
    if (line.rfind("VmHWM:", 0) == 0) s.hwm_kib = std::stol(line.substr(6));
  }
  return s;
}

struct throughput_options {
  int port = 1883;
  int zones = 1000;
  long count = 200000;
  int qos = 1;
  int connections = 4;
  std::string target = "service";
  std::string prefix = "dm";
  int service_pid = 0;
  double timeout_s = 300;
};

int run_throughput(const throughput_options& o) {
  const reading_plan plan{o.zones, loop_count(o.zones)};
  const std::string run_id =
      std::to_string(::getpid()) + "-" + std::to_string(clock_type::now().time_since_epoch().count() % 1000000);
  std::atomic<long> received{0};
  std::atomic<int> sentinels{0};
  std::mutex m;
  std::condition_variable cv;
  std::vector<std::string> ids{"lg-watch-" + run_id};
  for (int k = 0; k < o.connections; ++k) ids.push_back("lg-pub-" + run_id + "-" + std::to_string(k));
  auto clients = connect_clients(o.port, ids, false);
  auto watcher = std::move(clients.front());
  std::vector<std::unique_ptr<mqtt::async_client>> pubs;
  for (int k = 0; k < o.connections; ++k) pubs.push_back(std::move(clients[k + 1]));
  const bool bare = o.target == "bare";
  watcher->set_message_callback([&](mqtt::const_message_ptr msg) {
    if (bare) {
      received.store(o.count);  // the only message on lg-done/: the bare subscriber has them all
      cv.notify_all();
      return;
    }
    const std::string& p = msg->get_payload_str();
    if (p.find("\"rejected\"") != std::string::npos && p.find("sentinel-" + run_id) != std::string::npos) {
      sentinels.fetch_add(1);
      cv.notify_all();
    }
  });
  watcher->subscribe(bare ? "lg-done/#" : o.prefix + "/events", 1)->wait();

  const proc_sample before = sample_process(o.service_pid);
  const auto t0 = clock_type::now();
  std::vector<std::thread> threads;
  for (int k = 0; k < o.connections; ++k) {
    std::string sentinel_topic, sentinel_payload;
    if (!bare) {
      sentinel_topic = o.prefix + "/cmd/ack";
      sentinel_payload = R"({"zone":"sentinel-)" + run_id + "-" + std::to_string(k) + R"(","by":"bench"})";
    }
    threads.emplace_back([&, k, sentinel_topic, sentinel_payload] {
      publish_share(*pubs[k], plan, k, o.count, o.connections, o.qos, sentinel_topic, sentinel_payload);
    });
  }
  for (auto& t : threads) t.join();
  const double publish_s = seconds_since(t0);
  bool done = false;
  {
    std::unique_lock<std::mutex> lock(m);
    done = cv.wait_for(lock, std::chrono::duration<double>(o.timeout_s),
                       [&] { return bare ? received.load() >= o.count : sentinels.load() >= o.connections; });
  }
  const double elapsed_s = seconds_since(t0);
  const proc_sample after = sample_process(o.service_pid);
  if (!done) {
    std::fprintf(stderr, "loadgen: timeout after %.1f s (bare received %ld of %ld, sentinels %d of %d)\n", elapsed_s,
                 received.load(), o.count, sentinels.load(), o.connections);
    return 1;
  }
  const double rate = static_cast<double>(o.count) / elapsed_s;
  std::printf(
      "%s: %ld readings at QoS %d over %d connections, %d zones: %.0f msg/s (published in %.2f s, taken in %.2f s)\n",
      o.target.c_str(), o.count, o.qos, o.connections, o.zones, rate, publish_s, elapsed_s);
  result("rate_msg_s", rate, "msg/s");
  result("elapsed_s", elapsed_s, "s");
  if (o.service_pid > 0) {
    const double cpu = after.cpu_s - before.cpu_s;
    result("service_cpu_s", cpu, "s");
    result("service_cpu_s_per_million", cpu / static_cast<double>(o.count) * 1e6, "s");
    result("service_rss_kib", static_cast<double>(after.rss_kib), "KiB");
    result("service_hwm_kib", static_cast<double>(after.hwm_kib), "KiB");
  }
  close_all(pubs);
  close_all(watcher);
  return 0;
}

// ---- the bare subscriber ----

double own_cpu_s() {
  rusage u{};
  getrusage(RUSAGE_SELF, &u);
  return static_cast<double>(u.ru_utime.tv_sec + u.ru_stime.tv_sec) +
         static_cast<double>(u.ru_utime.tv_usec + u.ru_stime.tv_usec) / 1e6;
}

int run_subscribe(int port, long count, int qos, double timeout_s) {
  const std::string id = std::to_string(::getpid());
  auto c = connect_client(port, "lg-bare-" + id, false);
  std::mutex m;
  std::condition_variable cv;
  std::atomic<long> received{0};
  c->set_message_callback([&](mqtt::const_message_ptr) {
    if (received.fetch_add(1) + 1 == count) cv.notify_all();
  });
  c->subscribe("lg/#", qos)->wait();
  std::printf("subscribed\n");
  std::fflush(stdout);
  const double cpu0 = own_cpu_s();
  std::unique_lock<std::mutex> lock(m);
  const bool ok = cv.wait_for(lock, std::chrono::duration<double>(timeout_s), [&] { return received.load() >= count; });
  lock.unlock();
  const double cpu = own_cpu_s() - cpu0;
  if (!ok) {
    std::fprintf(stderr, "loadgen subscribe: %ld of %ld messages within %.0f s\n", received.load(), count, timeout_s);
    return 1;
  }
  c->publish("lg-done/" + id, std::to_string(count), 1, false)->wait();
  result("bare_cpu_s", cpu, "s");
  result("bare_cpu_s_per_million", cpu / static_cast<double>(count) * 1e6, "s");
  close_all(c);
  return 0;
}

// ---- latency ----

struct latency_options {
  int port = 1883;
  int samples = 200;
  std::string target = "service";
  std::string prefix = "dm";
  double gap_s = 0.02;
  double show_slow_ms = 0;  // > 0: print every round trip slower than this (with its time)
  int warm_up = 10;         // round trips not counted (0: measure from the first, e.g. into a burst)
};

double percentile(std::vector<double> v, double p) {
  if (v.empty()) return 0;
  std::sort(v.begin(), v.end());
  const auto i = static_cast<std::size_t>(p * static_cast<double>(v.size() - 1) + 0.5);
  return v[std::min(i, v.size() - 1)];
}

int run_latency(const latency_options& o) {
  const std::string run_id = std::to_string(::getpid());
  const bool echo = o.target == "echo";
  std::vector<std::string> ids{"lg-probe-" + run_id};
  if (echo) ids.push_back("lg-echo-" + run_id);
  auto clients = connect_clients(o.port, ids, true);
  auto probe = std::move(clients.front());
  std::unique_ptr<mqtt::async_client> echoer;
  if (echo) {
    echoer = std::move(clients.back());
    auto* e = echoer.get();
    echoer->set_message_callback(
        [e](mqtt::const_message_ptr msg) { e->publish("lg/echo/out", msg->get_payload_str(), 1, false); });
    echoer->subscribe("lg/echo/in", 1)->wait();
  }
  std::mutex m;
  std::condition_variable cv;
  std::atomic<int> answers{0};
  probe->set_message_callback([&](mqtt::const_message_ptr msg) {
    const std::string& p = msg->get_payload_str();
    if (echo || (p.find("\"band\"") != std::string::npos && p.find("\"probe\"") != std::string::npos)) {
      answers.fetch_add(1);
      cv.notify_all();
    }
  });
  probe->subscribe(echo ? "lg/echo/out" : o.prefix + "/events", 1)->wait();
  if (!echo) {
    // The probe zone's air and water; then its surface alternates wet and dry.
    probe->publish("lg/probe/t", "24.0", 1, false)->wait();
    probe->publish("lg/probe/rh", "50.0", 1, false)->wait();
    probe->publish("lg/probe/supply", "17.0", 1, false)->wait();
    probe->publish("lg/probe/s", "19.5", 1, false)->wait();
    std::this_thread::sleep_for(std::chrono::milliseconds(500));
  }
  std::vector<double> rtt_ms;
  int wet = 1;
  // The first round trips warm up the connections and caches: not counted.
  for (int i = -o.warm_up; i < o.samples; ++i) {
    const int before = answers.load();
    const auto t0 = clock_type::now();
    if (echo) {
      probe->publish("lg/echo/in", std::to_string(i), 1, false);
    } else {
      probe->publish("lg/probe/s", wet ? "5.0" : "19.5", 1, false);
      wet = 1 - wet;
    }
    std::unique_lock<std::mutex> lock(m);
    if (!cv.wait_for(lock, std::chrono::seconds(5), [&] { return answers.load() > before; })) {
      std::fprintf(stderr, "loadgen: no answer to probe %d within 5 s\n", i);
      return 1;
    }
    if (i >= 0) rtt_ms.push_back(seconds_since(t0) * 1e3);
    if (o.show_slow_ms > 0 && i >= 0 && rtt_ms.back() > o.show_slow_ms) {
      const auto wall_ms =
          std::chrono::duration_cast<std::chrono::milliseconds>(std::chrono::system_clock::now().time_since_epoch())
              .count();
      std::fprintf(stderr, "slow round trip %d: %.2f ms, answered at wall ms %lld (ms of the second: %lld)\n", i,
                   rtt_ms.back(), static_cast<long long>(wall_ms), static_cast<long long>(wall_ms % 1000));
    }
    lock.unlock();
    std::this_thread::sleep_for(std::chrono::duration<double>(o.gap_s));
  }
  const double p50 = percentile(rtt_ms, 0.5), p99 = percentile(rtt_ms, 0.99), mx = percentile(rtt_ms, 1.0);
  std::printf("%s round trip over %d samples: p50 %.2f ms, p99 %.2f ms, max %.2f ms\n", o.target.c_str(), o.samples,
              p50, p99, mx);
  result("rtt_p50_ms", p50, "ms");
  result("rtt_p99_ms", p99, "ms");
  result("rtt_max_ms", mx, "ms");
  close_all(probe);
  if (echoer) close_all(echoer);
  return 0;
}

// ---- ready ----

int run_ready(int port, const std::string& prefix, double timeout_s) {
  auto c = connect_client(port, "lg-ready-" + std::to_string(::getpid()), false);
  std::mutex m;
  std::condition_variable cv;
  bool online = false;
  c->set_message_callback([&](mqtt::const_message_ptr msg) {
    if (msg->get_payload_str().find("\"online\"") != std::string::npos) {
      std::lock_guard<std::mutex> lock(m);
      online = true;
      cv.notify_all();
    }
  });
  c->subscribe(prefix + "/status", 1)->wait();
  std::unique_lock<std::mutex> lock(m);
  const bool ok = cv.wait_for(lock, std::chrono::duration<double>(timeout_s), [&] { return online; });
  lock.unlock();
  close_all(c);
  if (!ok) {
    std::fprintf(stderr, "loadgen: the service did not come online within %.0f s\n", timeout_s);
    return 1;
  }
  return 0;
}

}  // namespace

int main(int argc, char** argv) {
  CLI::App app{"dewmargin benchmark load generator and probes"};
  app.require_subcommand(1);

  int zones = 1000, port = 1883, http_port = 0;
  std::string dir = ".", prefix = "dm";
  auto* site = app.add_subcommand("site", "write a benchmark site config");
  site->add_option("--zones", zones)->required();
  site->add_option("--port", port)->required();
  site->add_option("--dir", dir)->required();
  site->add_option("--prefix", prefix);
  site->add_option("--http-port", http_port);

  throughput_options t;
  auto* tp = app.add_subcommand("throughput", "publish readings as fast as the broker takes them");
  tp->add_option("--port", t.port)->required();
  tp->add_option("--zones", t.zones)->required();
  tp->add_option("--count", t.count);
  tp->add_option("--qos", t.qos)->check(CLI::Range(0, 1));
  tp->add_option("--connections", t.connections)->check(CLI::Range(1, 32));
  tp->add_option("--target", t.target)->check(CLI::IsMember({"bare", "service"}));
  tp->add_option("--prefix", t.prefix);
  tp->add_option("--service-pid", t.service_pid);
  tp->add_option("--timeout", t.timeout_s);

  latency_options l;
  auto* lat = app.add_subcommand("latency", "round trip of a reading");
  lat->add_option("--port", l.port)->required();
  lat->add_option("--samples", l.samples);
  lat->add_option("--target", l.target)->check(CLI::IsMember({"echo", "service"}));
  lat->add_option("--prefix", l.prefix);
  lat->add_option("--show-slow-ms", l.show_slow_ms, "print each round trip slower than this, with its wall time");
  lat->add_option("--warm-up", l.warm_up, "round trips before the measured ones (default 10)")->check(CLI::Range(0, 1000));

  long sub_count = 100000;
  int sub_qos = 1;
  double sub_timeout_s = 300;
  auto* sub = app.add_subcommand("subscribe", "a bare subscriber that counts readings");
  sub->add_option("--port", port)->required();
  sub->add_option("--count", sub_count)->required();
  sub->add_option("--qos", sub_qos)->check(CLI::Range(0, 1));
  sub->add_option("--timeout", sub_timeout_s);

  double ready_timeout_s = 60;
  auto* ready = app.add_subcommand("ready", "wait until the service is online");
  ready->add_option("--port", port)->required();
  ready->add_option("--prefix", prefix);
  ready->add_option("--timeout", ready_timeout_s);

  // Bad usage exits 2 with one line, as the project's other commands do.
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    if (e.get_exit_code() == 0) return app.exit(e);
    std::fprintf(stderr, "loadgen: %s (see --help)\n", e.what());
    return 2;
  }
  try {
    if (*site) {
      write_site(dir + "/site.yaml", zones, port, dir, prefix, http_port);
      return 0;
    }
    if (*tp) return run_throughput(t);
    if (*lat) return run_latency(l);
    if (*sub) return run_subscribe(port, sub_count, sub_qos, sub_timeout_s);
    if (*ready) return run_ready(port, prefix, ready_timeout_s);
  } catch (const std::exception& e) {
    std::fprintf(stderr, "loadgen: %s\n", e.what());
    return 1;
  }
  return 2;
}
